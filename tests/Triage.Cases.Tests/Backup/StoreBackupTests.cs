using System.IO.Compression;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Backup;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Backup;

/// <summary>Backup and restore of a seeded SQLite store while another connection keeps writing to it.</summary>
public sealed class StoreBackupTests(IntakeFixture fixture) : IClassFixture<IntakeFixture>
{
    private static readonly Actor Admin = new("id-admin", "ada.min", new HashSet<string> { Roles.Admin });

    private StoreBackup Service() => fixture.Store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<StoreBackup>();
    private string Archive(string name) => Path.Combine(fixture.Store.Folder, name);
    private string DataFolder => fixture.Store.Host.Services.GetRequiredService<TriagePaths>().DataFolder;

    [Fact]
    public async Task A_backup_taken_and_restored_while_the_store_is_in_use_brings_back_exactly_what_it_held()
    {
        using var writer = new Heartbeat(fixture.Store);
        var before = await fixture.FingerprintAsync();
        var archive = Archive("round-trip.zip");
        var pseudonymKey = Path.Combine(DataFolder, Triage.Cases.Export.Pseudonyms.KeyFileName);
        var keyBytes = Enumerable.Range(0, 32).Select(i => (byte)(i * 7 + 1)).ToArray();
        await File.WriteAllBytesAsync(pseudonymKey, keyBytes);

        var taken = await Service().BackupAsync(archive, Admin);

        await using (var db = fixture.Store.NewContext())
        {
            Assert.Equal((await db.Claims.CountAsync(), await db.Cases.CountAsync()), (taken.Claims, taken.Cases));
            // Change the store after the backup: new claims, and a model file lost from disk.
            db.Claims.AddRange(Build.Claim(), Build.Claim(), Build.Claim());
            await db.SaveChangesAsync();
        }
        var modelFile = Path.Combine(DataFolder, Assert.Single(taken.ModelFiles));
        File.Delete(modelFile);
        File.Delete(pseudonymKey);
        Assert.NotEqual(before, await fixture.FingerprintAsync());

        await Service().RestoreAsync(archive, Admin);
        var beatsAtRestore = writer.Beats;

        Assert.Equal(before, await fixture.FingerprintAsync());
        Assert.True(File.Exists(modelFile));
        Assert.Equal(keyBytes, await File.ReadAllBytesAsync(pseudonymKey)); // exports keep their pseudonyms
        Assert.Equal("ok", await IntegrityAsync());
        Assert.Equal(1, await fixture.AuditCountAsync("store.restored"));
        await writer.WaitForBeatsAfterAsync(beatsAtRestore); // the other connection keeps working on the restored file
        writer.ThrowIfFailed();
    }

    [Fact]
    public async Task An_archive_that_is_not_a_whole_triage_backup_is_refused_and_the_store_is_unchanged()
    {
        var before = await fixture.FingerprintAsync();
        var notZip = Archive("not-a-zip.zip");
        await File.WriteAllTextAsync(notZip, "claim_number,line\nA-1,motor\n");
        var noDb = Archive("no-db.zip");
        using (var zip = ZipFile.Open(noDb, ZipArchiveMode.Create)) zip.CreateEntry("readme.txt");
        var badDb = Archive("bad-db.zip");
        using (var zip = ZipFile.Open(badDb, ZipArchiveMode.Create))
        await using (var s = zip.CreateEntry("triage.db").Open())
            await s.WriteAsync(Enumerable.Range(0, 8192).Select(i => (byte)(i * 37)).ToArray());
        var future = await FutureMigrationArchiveAsync();

        foreach (var (file, says) in new[] { (notZip, "not a readable zip"), (noDb, "holds no triage.db"), (badDb, "cannot be read"), (future, "does not know") })
        {
            var e = await Assert.ThrowsAsync<BackupRefusedException>(() => Service().RestoreAsync(file, Admin));
            Assert.Contains(says, e.Message);
        }
        Assert.Equal(before, await fixture.FingerprintAsync());
    }

    [Fact]
    public async Task Only_admins_back_up_or_restore()
    {
        var analyst = IntakeFixture.Analyst;
        await Assert.ThrowsAsync<AccessDeniedException>(() => Service().BackupAsync(Archive("denied.zip"), analyst));
        await Assert.ThrowsAsync<AccessDeniedException>(() => Service().RestoreAsync(Archive("denied.zip"), analyst));
        Assert.False(File.Exists(Archive("denied.zip")));
    }

    [SkippableFact]
    public async Task On_postgresql_the_service_points_to_pg_dump()
    {
        await using var pg = TestStore.Create("Postgres");
        await (await pg.MigratedAsync()).DisposeAsync();
        var service = pg.Host.Services.CreateScope().ServiceProvider.GetRequiredService<StoreBackup>();
        var e = await Assert.ThrowsAsync<BackupRefusedException>(() => service.BackupAsync(Path.Combine(pg.Folder, "pg.zip"), Admin));
        Assert.Contains("pg_dump", e.Message);
    }

    /// <summary>A real backup whose database claims a migration newer than this build has.</summary>
    private async Task<string> FutureMigrationArchiveAsync()
    {
        var archive = Archive("future.zip");
        await Service().BackupAsync(archive, Admin);
        var work = Directory.CreateTempSubdirectory("triage-future-").FullName;
        ZipFile.ExtractToDirectory(archive, work);
        await using (var c = new SqliteConnection($"Data Source={Path.Combine(work, "triage.db")};Pooling=False"))
        {
            await c.OpenAsync();
            await using var cmd = c.CreateCommand();
            cmd.CommandText = "INSERT INTO __EFMigrationsHistory (MigrationId, ProductVersion) VALUES ('29991231000000_FromTheFuture', '99.0')";
            await cmd.ExecuteNonQueryAsync();
        }
        File.Delete(archive);
        ZipFile.CreateFromDirectory(work, archive);
        Directory.Delete(work, recursive: true);
        return archive;
    }

    private async Task<string?> IntegrityAsync()
    {
        await using var db = fixture.Store.NewContext();
        await using var c = new SqliteConnection(db.Database.GetConnectionString());
        await c.OpenAsync();
        await using var cmd = c.CreateCommand();
        cmd.CommandText = "PRAGMA integrity_check";
        return (string?)await cmd.ExecuteScalarAsync();
    }

    /// <summary>Another user of the store: writes an audit event every few milliseconds until disposed.</summary>
    private sealed class Heartbeat : IDisposable
    {
        private readonly CancellationTokenSource _stop = new();
        private readonly Task _loop;
        private Exception? _failure;
        private int _beats;

        public Heartbeat(TestStore store) => _loop = Task.Run(async () =>
        {
            try
            {
                while (!_stop.IsCancellationRequested)
                {
                    await using var db = store.NewContext();
                    db.AuditEvents.Add(new AuditEvent("test", "test.heartbeat", null, DateTime.UtcNow));
                    await db.SaveChangesAsync();
                    Interlocked.Increment(ref _beats);
                    await Task.Delay(5);
                }
            }
            catch (Exception e) { _failure = e; }
        });

        public int Beats => Volatile.Read(ref _beats);

        public async Task WaitForBeatsAfterAsync(int beats)
        {
            for (var i = 0; i < 500 && Beats <= beats + 2 && _failure is null; i++) await Task.Delay(10);
            ThrowIfFailed();
            Assert.True(Beats > beats + 2, "the writer made no progress after the restore");
        }

        public void ThrowIfFailed()
        {
            if (_failure is not null) throw new Xunit.Sdk.XunitException($"the concurrent writer failed: {_failure}");
        }

        public void Dispose()
        {
            _stop.Cancel();
            _loop.Wait();
            _stop.Dispose();
        }
    }
}
