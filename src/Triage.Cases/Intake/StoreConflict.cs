using Microsoft.Data.Sqlite;
using Npgsql;

namespace Triage.Cases.Intake;

/// <summary>Errors that mean another writer got there first: the work is safe to retry from the start.</summary>
internal static class StoreConflict
{
    // SQLite: 19 constraint (unique claim number), 5 busy, 6 locked. PostgreSQL: unique violation,
    // serialization failure, deadlock.
    public static bool Is(Exception e)
    {
        for (var x = (Exception?)e; x is not null; x = x.InnerException)
            if (x is SqliteException { SqliteErrorCode: 19 or 5 or 6 } || x is PostgresException { SqlState: "23505" or "40001" or "40P01" })
                return true;
        return false;
    }
}
