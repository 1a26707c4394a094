using Microsoft.EntityFrameworkCore;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests;

public sealed class MigrationTests
{
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Migrations_apply_from_empty_and_match_the_model(string provider)
    {
        await using var store = TestStore.Create(provider);
        await using var db = store.NewContext();
        Assert.False(db.Database.HasPendingModelChanges(), $"The {provider} model has changes no migration covers; add a migration.");
        await db.Database.MigrateAsync();
        Assert.Equal(db.Database.GetMigrations(), await db.Database.GetAppliedMigrationsAsync());
        Assert.Equal(0, await db.Cases.CountAsync());
        Assert.Equal(0, await db.Users.CountAsync());
    }
}
