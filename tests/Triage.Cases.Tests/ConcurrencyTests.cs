using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests;

public sealed class ConcurrencyTests
{
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task A_stale_copy_of_a_case_cannot_overwrite_a_newer_save(string provider)
    {
        await using var store = TestStore.Create(provider);
        var ines = Build.User("ines");
        var tomas = Build.User("tomas");
        int id;
        await using (var db = await store.MigratedAsync())
        {
            db.Users.AddRange(ines, tomas);
            var c = Build.Case();
            db.Cases.Add(c);
            await db.SaveChangesAsync();
            id = c.Id;
        }
        await using var first = store.NewContext();
        await using var second = store.NewContext();
        var a = await first.Cases.Include(c => c.Assignments).SingleAsync(c => c.Id == id);
        var b = await second.Cases.Include(c => c.Assignments).SingleAsync(c => c.Id == id);
        a.AssignTo(await first.Users.SingleAsync(u => u.Id == ines.Id), Actor.System, Build.Now);
        await first.SaveChangesAsync();
        b.AssignTo(await second.Users.SingleAsync(u => u.Id == tomas.Id), Actor.System, Build.Now);
        var e = await Assert.ThrowsAsync<StaleCaseException>(() => second.SaveChangesAsync());
        Assert.Contains($"Case {b.ClaimNumber} was changed by someone else", e.Message);
        Assert.Contains("reload", e.Message);
        await using var check = store.NewContext();
        Assert.Equal(ines.Id, (await check.Cases.SingleAsync(c => c.Id == id)).AssigneeId);
    }
}
