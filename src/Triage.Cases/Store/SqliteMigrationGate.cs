using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Logging;

namespace Triage.Cases.Store;

/// <summary>
/// Migrates a SQLite store safely after a crash. EF Core guards SQLite migrations with a row in
/// <c>__EFMigrationsLock</c> that only the migrating process deletes, and it takes that row on every start, even
/// with nothing to migrate; a process killed meanwhile leaves the row, and every later start waits on it forever
/// (dotnet/efcore#38958; found by the crash tests). Here an OS file lock next to the database decides who
/// migrates: the OS drops it when its holder dies, so whoever holds it knows a lock row is a leftover and removes it.
/// </summary>
internal static class SqliteMigrationGate
{
    private const string HasLockTable = "SELECT COUNT(*) AS \"Value\" FROM sqlite_master WHERE type = 'table' AND name = '__EFMigrationsLock'";
    private const string ClearLockTable = "DELETE FROM \"__EFMigrationsLock\"";

    public static async Task MigrateAsync(TriageDbContext db, ILogger log, CancellationToken ct)
    {
        var file = new SqliteConnectionStringBuilder(db.Database.GetConnectionString()).DataSource;
        await using var gate = await AcquireAsync(file + ".migrating", log, ct);
        // A query on a missing file would create it empty, and EF then skips creating the store itself, which
        // is where it turns on WAL: a new store has no leftover lock to clear anyway.
        var hasTable = File.Exists(file) && await db.Database.SqlQueryRaw<int>(HasLockTable).SingleAsync(ct) > 0;
        if (hasTable && await db.Database.ExecuteSqlRawAsync(ClearLockTable, ct) > 0)
            log.LogWarning("Removed a migration lock left in the store by a process that stopped while migrating it");
        await db.Database.MigrateAsync(ct);
    }

    private static async Task<FileStream> AcquireAsync(string path, ILogger log, CancellationToken ct)
    {
        for (var (delay, told) = (50, false); ; delay = Math.Min(2 * delay, 1000))
        {
            if (ExclusiveFile.TryOpen(path) is { } file) return file;
            if (!told) log.LogInformation("Waiting for another process to finish migrating {File}", path);
            told = true;
            await Task.Delay(delay, ct);
        }
    }
}
