using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Hosting;
using Triage.Cases.Models;
using Triage.Cases.Tests.Models;
using Triage.Cases.Tests.Support;
using Triage.Scoring.Models;

namespace Triage.Cases.Tests;

/// <summary>What a process killed mid-way leaves behind does not stop the next start or the next retrain (tests/Triage.EndToEnd/CrashSafety kills the real app).</summary>
public sealed class CrashRecoveryTests
{
    private static readonly TimeSpan Patience = TimeSpan.FromMinutes(2);

    [Fact]
    public async Task A_migration_lock_left_by_a_killed_process_does_not_stop_the_next_start()
    {
        await using var store = TestStore.Create();
        await store.Host.Services.InitialiseStoreAsync();
        await using (var db = store.NewContext())
            // What EF Core's SQLite migrator leaves when its process dies between taking and releasing the lock.
            await db.Database.ExecuteSqlRawAsync("INSERT INTO \"__EFMigrationsLock\" (\"Id\", \"Timestamp\") VALUES (1, '2027-03-15 09:00:00+00:00')");

        await store.Host.Services.InitialiseStoreAsync().WaitAsync(Patience);

        await using var check = store.NewContext();
        Assert.Equal(0, await check.Database.SqlQueryRaw<int>("SELECT COUNT(*) AS \"Value\" FROM \"__EFMigrationsLock\"").SingleAsync());
    }

    [Fact]
    public async Task A_new_store_is_created_in_write_ahead_log_mode()
    {
        // EF Core turns WAL on only when it creates the file itself; readers then never block the writer
        // (SQLite docs, "Write-Ahead Logging"). A check before migrating must not create the file first.
        await using var store = TestStore.Create();
        await store.Host.Services.InitialiseStoreAsync();

        await using var db = store.NewContext();
        Assert.Equal("wal", db.Database.SqlQueryRaw<string>("PRAGMA journal_mode").AsEnumerable().Single());
    }

    [Fact]
    public async Task A_start_waits_while_another_process_migrates_and_then_goes_ahead()
    {
        await using var store = TestStore.Create();
        await store.Host.Services.InitialiseStoreAsync();
        var gate = store.Host.Services.GetRequiredService<TriagePaths>().SqliteFile + ".migrating";
        Task start;
        // Holding the gate file as another migrating process would (an exclusive lock the OS drops with its holder).
        await using (new FileStream(gate, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None))
        {
            start = store.Host.Services.InitialiseStoreAsync();
            await Task.Delay(300);
            Assert.False(start.IsCompleted, "the start migrated while another process held the migration gate");
        }
        await start.WaitAsync(Patience);
    }

    [Fact]
    public async Task Files_a_retrain_killed_between_saving_and_registering_left_do_not_block_the_next_retrain()
    {
        await using var s = await ModelStore.CreateAsync();
        // A half-written temporary file and a whole file nobody registered, both under the name the next retrain takes.
        await File.WriteAllTextAsync(Path.Combine(s.ModelsFolder, ".v2.model.0123456789abcdef.tmp"), "PK half a zip");
        File.Copy(Path.Combine(s.ModelsFolder, "v1.model"), Path.Combine(s.ModelsFolder, "v2.model"));

        var result = await s.RetrainAsync();

        Assert.Equal(RetrainOutcome.Succeeded, result.Outcome);
        Assert.Equal("v2", result.Version);
        Assert.Equal("v2", ScoringModel.Load(Path.Combine(s.ModelsFolder, "v2.model")).Metadata.Version);
        Assert.Equal(["v1.model", "v2.model"], Directory.GetFiles(s.ModelsFolder).Select(Path.GetFileName).Order());
    }
}
