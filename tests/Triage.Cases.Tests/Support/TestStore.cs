using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Npgsql;
using Triage.Cases.Hosting;
using Triage.Cases.Store;

namespace Triage.Cases.Tests.Support;

public sealed class FixedClock(DateTimeOffset now) : TimeProvider
{
    public override DateTimeOffset GetUtcNow() => now;
}

/// <summary>A host with the case services over a fresh database: a temp SQLite file or a throwaway PostgreSQL database.</summary>
public sealed class TestStore : IAsyncDisposable
{
    public const string PostgresEnv = "TRIAGE_TEST_POSTGRES";
    public static readonly DateTimeOffset Today = new(2027, 3, 15, 9, 30, 0, TimeSpan.Zero);

    private readonly string? _postgresDb;
    private readonly string? _adminConnection;

    public string Folder { get; }
    public IHost Host { get; }

    private TestStore(string provider, Dictionary<string, string?> extra)
    {
        Folder = Path.Combine(Path.GetTempPath(), "triage-tests", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(Folder);
        var settings = new Dictionary<string, string?>
        {
            ["Storage:Provider"] = provider,
            ["Storage:DataFolder"] = Path.Combine(Folder, "data"),
            ["Demo:Enabled"] = "true",
            ["Demo:Password"] = TinySeed.Password,
            ["Demo:SeedFolder"] = Path.Combine(Folder, "seed"),
            ["Queue:Threshold"] = "0.3",
            // No random audit sample unless a test asks for one, so which claims queue is exact.
            ["Queue:AuditShare"] = "0",
        };
        if (provider == "Postgres")
        {
            _adminConnection = Environment.GetEnvironmentVariable(PostgresEnv)!;
            _postgresDb = $"triage_test_{Guid.NewGuid():N}";
            settings["Storage:ConnectionString"] = new NpgsqlConnectionStringBuilder(_adminConnection) { Database = _postgresDb }.ConnectionString;
        }
        foreach (var (k, v) in extra) settings[k] = v;
        var builder = Microsoft.Extensions.Hosting.Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { EnvironmentName = "Testing" });
        builder.Configuration.AddTriageSettings("Testing");
        builder.Configuration.AddInMemoryCollection(settings);
        builder.Services.AddSingleton<TimeProvider>(new FixedClock(Today));
        builder.AddTriageCases();
        Host = builder.Build();
    }

    public static string? PostgresSkipReason =>
        string.IsNullOrWhiteSpace(Environment.GetEnvironmentVariable(PostgresEnv))
            ? $"PostgreSQL tests skipped: set {PostgresEnv} to a server connection string (e.g. Host=127.0.0.1;Port=5433;Username=postgres;Password=postgres)."
            : null;

    public static TestStore Create(string provider = "Sqlite", Dictionary<string, string?>? extra = null)
    {
        if (provider == "Postgres") Skip.If(PostgresSkipReason is not null, PostgresSkipReason);
        return new TestStore(provider, extra ?? []);
    }

    public string WriteSeed(int historyRows = 600, int openRows = 80) =>
        TinySeed.Write(Path.Combine(Folder, "seed"), historyRows, openRows);

    public TriageDbContext NewContext() => Host.Services.CreateScope().ServiceProvider.GetRequiredService<TriageDbContext>();

    public async Task<TriageDbContext> MigratedAsync()
    {
        var db = NewContext();
        await db.Database.MigrateAsync();
        return db;
    }

    public async ValueTask DisposeAsync()
    {
        Host.Dispose();
        if (_postgresDb is not null)
        {
            NpgsqlConnection.ClearAllPools();
            await using var admin = new NpgsqlConnection(_adminConnection);
            await admin.OpenAsync();
            await using var drop = new NpgsqlCommand($"DROP DATABASE IF EXISTS \"{_postgresDb}\" WITH (FORCE)", admin);
            await drop.ExecuteNonQueryAsync();
        }
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        try { Directory.Delete(Folder, recursive: true); } catch (IOException) { /* a file still open on a slow disk */ }
    }
}
