using Microsoft.EntityFrameworkCore;

namespace Triage.Cases.Store;

// One subclass per provider so each keeps its own migrations folder.
public sealed class SqliteTriageDbContext(DbContextOptions<SqliteTriageDbContext> options) : TriageDbContext(options);

public sealed class PostgresTriageDbContext(DbContextOptions<PostgresTriageDbContext> options) : TriageDbContext(options);
