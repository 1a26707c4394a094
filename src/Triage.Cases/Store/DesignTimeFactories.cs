using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Design;

namespace Triage.Cases.Store;

// Used only by `dotnet ef migrations add`; neither opens a connection.
internal sealed class SqliteDesignTimeFactory : IDesignTimeDbContextFactory<SqliteTriageDbContext>
{
    public SqliteTriageDbContext CreateDbContext(string[] args) =>
        new(new DbContextOptionsBuilder<SqliteTriageDbContext>().UseSqlite("Data Source=design.db").Options);
}

internal sealed class PostgresDesignTimeFactory : IDesignTimeDbContextFactory<PostgresTriageDbContext>
{
    public PostgresTriageDbContext CreateDbContext(string[] args) =>
        new(new DbContextOptionsBuilder<PostgresTriageDbContext>().UseNpgsql("Host=localhost;Database=triage_design").Options);
}
