using Microsoft.EntityFrameworkCore;

namespace Triage.Cases.Store;

public sealed class SqliteTriageDbContext(DbContextOptions<SqliteTriageDbContext> options) : TriageDbContext(options)
{
    protected override string TrueFilter(string column) => $"\"{column}\" = 1";
}

public sealed class PostgresTriageDbContext(DbContextOptions<PostgresTriageDbContext> options) : TriageDbContext(options)
{
    protected override string TrueFilter(string column) => $"\"{column}\"";
}
