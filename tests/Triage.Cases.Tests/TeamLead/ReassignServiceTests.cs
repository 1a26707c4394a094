using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.TeamLead;

public sealed class ReassignServiceTests
{
    private static readonly Actor Lead = new("id-lead", "lead", new HashSet<string> { Roles.TeamLead });

    private static async Task<List<CaseSeen>> SeedAsync(TestStore store, int cases)
    {
        await using var db = await store.MigratedAsync();
        db.Users.AddRange(Build.User("ines"), Build.User("tomas"), Build.User("kit"));
        var list = Enumerable.Range(0, cases).Select(i => Build.Case(0.2 + i * 0.01)).ToList();
        db.Cases.AddRange(list);
        await db.SaveChangesAsync();
        return list.Select(c => new CaseSeen(c.Id, c.Version)).ToList();
    }

    private static ReassignService Service(TestStore store) =>
        store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<ReassignService>();

    [Fact]
    public async Task One_changed_case_refuses_the_whole_request_and_names_it()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 3);
        await Service(store).ReassignAsync([seen[1]], "id-ines", "cover", Lead);
        var e = await Assert.ThrowsAsync<ReassignRefusedException>(() => Service(store).ReassignAsync(seen, "id-tomas", "balance", Lead));
        var only = Assert.Single(e.Reasons);
        Assert.Contains("changed meanwhile (now with INES)", only);
        await using var db = store.NewContext();
        Assert.Equal(2, await db.Cases.CountAsync(c => c.AssigneeId == null));
    }

    [Fact]
    public async Task Reassignment_is_in_the_history_and_the_audit_trail()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 2);
        await Service(store).ReassignAsync(seen, "id-kit", "Ines is in court", Lead);
        await using var db = store.NewContext();
        var cases = await db.Cases.Include(c => c.Assignments).Include(c => c.Audit).ToListAsync();
        Assert.All(cases, c =>
        {
            Assert.Equal("id-kit", c.AssigneeId);
            Assert.Equal("Ines is in court", Assert.Single(c.Assignments).Reason);
            Assert.Contains(c.Audit, a => a.What == "case.assigned" && a.Who == "lead");
        });
    }

    [Fact]
    public async Task An_investigator_may_not_reassign()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 1);
        await Assert.ThrowsAsync<AccessDeniedException>(() =>
            Service(store).ReassignAsync(seen, "id-kit", "x", new Actor("id-ines", "ines", new HashSet<string> { Roles.Investigator })));
    }

    // Two leads move the same selection at once from the same view: exactly one wins, whole; no case is assigned twice or lost.
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Concurrent_reassignments_of_one_selection_apply_exactly_one(string provider)
    {
        await using var store = TestStore.Create(provider);
        var seen = await SeedAsync(store, 6);
        var targets = new[] { "id-ines", "id-tomas", "id-kit", "id-ines" };
        var results = await Task.WhenAll(targets.Select(t => Task.Run(async () =>
        {
            try { await Service(store).ReassignAsync(seen, t, "parallel", Lead); return t; }
            catch (ReassignRefusedException) { return null; }
        })));
        var winner = Assert.Single(results, r => r is not null);
        await using var db = store.NewContext();
        var cases = await db.Cases.Include(c => c.Assignments).ToListAsync();
        Assert.Equal(6, cases.Count);
        Assert.All(cases, c => { Assert.Equal(winner, c.AssigneeId); Assert.Single(c.Assignments); });
    }
}
