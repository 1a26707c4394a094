using System.IO.Compression;
using System.Text.Json;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cases.Hosting;
using Triage.Cases.Store;

namespace Triage.Cases.Backup;

/// <summary>What a backup archive holds, written into it as <c>backup.json</c>.</summary>
public sealed record BackupManifest(DateTime CreatedAt, string CreatedBy, string LastMigration, int Claims, int Cases, IReadOnlyList<string> ModelFiles);

/// <summary>The archive is not one this build can restore; nothing was changed.</summary>
public sealed class BackupRefusedException(string message) : Exception(message);

/// <summary>
/// Backs up and restores the embedded store while the app keeps serving. A backup is one zip archive:
/// a consistent copy of the SQLite file taken with <c>VACUUM INTO</c> (a read transaction, so writers
/// only wait for it), the model files the registry points at, the export pseudonym key, and a manifest. A restore checks the whole
/// archive first, puts the model files in place, then copies the database into the live file with
/// SQLite's online backup API, which takes the file's locks like any writer, so open connections see
/// either the old store or the restored one, never a mix. PostgreSQL is backed up with its own tools.
/// </summary>
public sealed class StoreBackup(TriageDbContext db, TriagePaths paths, TimeProvider clock)
{
    private const string DatabaseEntry = "triage.db";
    private const string ManifestEntry = "backup.json";

    public async Task<BackupManifest> BackupAsync(string archive, Actor by, CancellationToken ct = default)
    {
        by.Require("back up the store", Roles.Admin);
        RequireSqlite();
        var work = Directory.CreateTempSubdirectory("triage-backup-").FullName;
        try
        {
            var copy = Path.Combine(work, DatabaseEntry);
            await using (var live = await OpenLiveAsync(ct))
            await using (var vacuum = live.CreateCommand())
            {
                vacuum.CommandText = "VACUUM INTO $file";
                vacuum.Parameters.AddWithValue("$file", copy);
                await vacuum.ExecuteNonQueryAsync(ct);
            }
            var manifest = await DescribeAsync(copy, by.UserName, ct);
            var partial = archive + ".partial";
            await using (var zip = new ZipArchive(File.Create(partial), ZipArchiveMode.Create))
            {
                zip.CreateEntryFromFile(copy, DatabaseEntry, CompressionLevel.Optimal);
                foreach (var model in manifest.ModelFiles)
                {
                    var source = Path.Combine(paths.DataFolder, model);
                    if (!File.Exists(source)) throw new BackupRefusedException($"Model file '{model}' named by the registry is missing from {paths.DataFolder}; the backup was not written.");
                    zip.CreateEntryFromFile(source, ModelEntry(model), CompressionLevel.Fastest);
                }
                // The pseudonym key too: without it, exports after a restore would give every claim a new pseudonym.
                var key = Path.Combine(paths.DataFolder, Pseudonyms.KeyFileName);
                if (File.Exists(key)) zip.CreateEntryFromFile(key, ModelEntry(Pseudonyms.KeyFileName), CompressionLevel.NoCompression);
                await using var m = zip.CreateEntry(ManifestEntry).Open();
                await JsonSerializer.SerializeAsync(m, manifest, cancellationToken: ct);
            }
            File.Move(partial, archive, overwrite: true); // a reader never finds half an archive under the final name
            db.AuditEvents.Add(new AuditEvent(by.UserName, "store.backed-up", $"{Path.GetFileName(archive)}: {manifest.Claims} claims, {manifest.Cases} cases", Now()));
            await db.SaveChangesAsync(ct);
            return manifest;
        }
        finally
        {
            SqliteConnection.ClearAllPools();
            Directory.Delete(work, recursive: true);
        }
    }

    public async Task<BackupManifest> RestoreAsync(string archive, Actor by, CancellationToken ct = default)
    {
        by.Require("restore the store", Roles.Admin);
        RequireSqlite();
        if (!File.Exists(archive)) throw new BackupRefusedException($"There is no backup at '{archive}'.");
        var work = Directory.CreateTempSubdirectory("triage-restore-").FullName;
        try
        {
            var copy = Path.Combine(work, DatabaseEntry);
            BackupManifest manifest;
            using (var zip = OpenArchive(archive))
            {
                var entry = zip.GetEntry(DatabaseEntry) ?? throw new BackupRefusedException($"'{archive}' holds no {DatabaseEntry}; it is not a Triage backup.");
                entry.ExtractToFile(copy);
                await CheckIntegrityAsync(copy, ct);
                manifest = await DescribeAsync(copy, by.UserName, ct);
                var known = db.Database.GetMigrations().ToHashSet();
                if (!known.Contains(manifest.LastMigration))
                    throw new BackupRefusedException($"The backup's store is at migration '{manifest.LastMigration}', which this version of Triage does not know; restore it with the version that made it.");
                // Every model file first, so the restored registry never points at a file that is not there.
                foreach (var model in manifest.ModelFiles)
                {
                    var source = zip.GetEntry(ModelEntry(model)) ?? throw new BackupRefusedException($"The backup lacks model file '{model}' that its registry names.");
                    var target = Path.GetFullPath(Path.Combine(paths.DataFolder, model));
                    if (!target.StartsWith(Path.GetFullPath(paths.DataFolder) + Path.DirectorySeparatorChar, StringComparison.Ordinal))
                        throw new BackupRefusedException($"The backup names model file '{model}' outside the data folder; nothing was restored.");
                    Directory.CreateDirectory(Path.GetDirectoryName(target)!);
                    source.ExtractToFile(target + ".restoring", overwrite: true);
                    File.Move(target + ".restoring", target, overwrite: true);
                }
                if (zip.GetEntry(ModelEntry(Pseudonyms.KeyFileName)) is { } key)
                {
                    var target = Path.Combine(paths.DataFolder, Pseudonyms.KeyFileName);
                    key.ExtractToFile(target + ".restoring", overwrite: true);
                    if (!OperatingSystem.IsWindows()) File.SetUnixFileMode(target + ".restoring", UnixFileMode.UserRead | UnixFileMode.UserWrite);
                    File.Move(target + ".restoring", target, overwrite: true);
                }
            }
            await using (var source = new SqliteConnection($"Data Source={copy};Mode=ReadOnly;Pooling=False"))
            await using (var live = await OpenLiveAsync(ct))
            {
                await source.OpenAsync(ct);
                await CopyIntoAsync(source, live, ct);
            }
            SqliteConnection.ClearAllPools();
            // An archive from an older version is brought up to this one's schema.
            await db.Database.MigrateAsync(ct);
            db.ChangeTracker.Clear();
            db.AuditEvents.Add(new AuditEvent(by.UserName, "store.restored",
                $"{Path.GetFileName(archive)} taken {manifest.CreatedAt:yyyy-MM-dd HH:mm} UTC by {manifest.CreatedBy}: {manifest.Claims} claims, {manifest.Cases} cases", Now()));
            await db.SaveChangesAsync(ct);
            return manifest;
        }
        finally
        {
            SqliteConnection.ClearAllPools();
            Directory.Delete(work, recursive: true);
        }
    }

    /// <summary>
    /// The backup API does not wait for a writer that holds the live file's lock, so a busy or locked
    /// answer is retried for a while; each attempt copies the whole file or nothing.
    /// </summary>
    private static async Task CopyIntoAsync(SqliteConnection source, SqliteConnection live, CancellationToken ct)
    {
        const int SqliteBusy = 5, SqliteLocked = 6;
        for (var attempt = 1; ; attempt++)
        {
            try
            {
                source.BackupDatabase(live);
                return;
            }
            catch (SqliteException e) when (e.SqliteErrorCode is SqliteBusy or SqliteLocked && attempt < 200)
            {
                await Task.Delay(50, ct);
            }
        }
    }

    private void RequireSqlite()
    {
        if (!db.Database.IsSqlite())
            throw new BackupRefusedException("The store is on PostgreSQL: back it up with pg_dump and restore with pg_restore (see docs/operations.md), and copy the data folder's models/ with it.");
    }

    private async Task<SqliteConnection> OpenLiveAsync(CancellationToken ct)
    {
        var live = new SqliteConnection(db.Database.GetConnectionString());
        await live.OpenAsync(ct);
        return live;
    }

    private static ZipArchive OpenArchive(string archive)
    {
        try { return ZipFile.OpenRead(archive); }
        catch (InvalidDataException e) { throw new BackupRefusedException($"'{archive}' is not a readable zip archive ({e.Message}); nothing was restored."); }
    }

    private static async Task CheckIntegrityAsync(string file, CancellationToken ct)
    {
        try
        {
            await using var c = new SqliteConnection($"Data Source={file};Mode=ReadOnly;Pooling=False");
            await c.OpenAsync(ct);
            await using var check = c.CreateCommand();
            check.CommandText = "PRAGMA integrity_check";
            var result = (string?)await check.ExecuteScalarAsync(ct);
            if (result != "ok") throw new BackupRefusedException($"The backup's database fails SQLite's integrity check ({result}); nothing was restored.");
        }
        catch (SqliteException e)
        {
            throw new BackupRefusedException($"The backup's database cannot be read ({e.Message}); nothing was restored.");
        }
    }

    /// <summary>Counts and the model files straight from the copied file, so the manifest describes what the archive holds.</summary>
    private async Task<BackupManifest> DescribeAsync(string file, string by, CancellationToken ct)
    {
        await using var c = new SqliteConnection($"Data Source={file};Mode=ReadOnly;Pooling=False");
        await c.OpenAsync(ct);
        async Task<List<string>> Strings(string sql)
        {
            await using var cmd = c.CreateCommand();
            cmd.CommandText = sql;
            await using var r = await cmd.ExecuteReaderAsync(ct);
            var list = new List<string>();
            while (await r.ReadAsync(ct)) list.Add(r.GetValue(0).ToString()!);
            return list;
        }
        try
        {
            var migration = (await Strings("SELECT MigrationId FROM __EFMigrationsHistory ORDER BY MigrationId DESC LIMIT 1")).SingleOrDefault()
                ?? throw new BackupRefusedException("The backup's database has no migration history; it is not a Triage store.");
            var claims = int.Parse((await Strings("SELECT COUNT(*) FROM Claims")).Single());
            var cases = int.Parse((await Strings("SELECT COUNT(*) FROM Cases")).Single());
            var models = await Strings("SELECT FilePath FROM ModelVersions ORDER BY Id");
            return new BackupManifest(Now(), by, migration, claims, cases, models);
        }
        catch (SqliteException e)
        {
            throw new BackupRefusedException($"The backup's database is not a Triage store ({e.Message}); nothing was restored.");
        }
    }

    private static string ModelEntry(string relativePath) => "data/" + relativePath.Replace('\\', '/');

    private DateTime Now() => clock.GetUtcNow().UtcDateTime;
}
