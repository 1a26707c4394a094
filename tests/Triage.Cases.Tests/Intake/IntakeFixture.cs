using System.Security.Cryptography;
using System.Text;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Intake;

/// <summary>A SQLite store after first start on the tiny seed, with a small model (20 trees) serving.</summary>
public class IntakeFixture : IAsyncLifetime
{
    public static readonly Actor Analyst = new("id-analyst", "ana.lyst", new HashSet<string> { Roles.Analyst });

    private TestStore? _store;

    public virtual string Provider => "Sqlite";

    /// <summary>The store; skips the calling test when it is PostgreSQL and no server is configured.</summary>
    public TestStore Store
    {
        get
        {
            Skip.If(_store is null, TestStore.PostgresSkipReason);
            return _store!;
        }
    }

    public async Task InitializeAsync()
    {
        // A fixture cannot skip; the tests skip when they ask for the store.
        if (Provider == "Postgres" && TestStore.PostgresSkipReason is not null) return;
        var settings = new Dictionary<string, string?>
        {
            ["Scoring:FastTree:NumberOfTrees"] = "20",
            ["Scoring:FastTree:NumberOfLeaves"] = "6",
            ["Demo:Enabled"] = "false",
        };
        foreach (var (k, v) in ExtraSettings) settings[k] = v;
        _store = TestStore.Create(Provider, extra: settings);
        _store.WriteSeed(historyRows: 400, openRows: 30);
        await _store.Host.Services.InitialiseStoreAsync();
    }

    /// <summary>Settings a derived fixture changes on top of the defaults above.</summary>
    protected virtual IReadOnlyDictionary<string, string?> ExtraSettings => new Dictionary<string, string?>();

    public async Task DisposeAsync()
    {
        if (_store is not null) await _store.DisposeAsync();
    }

    public async Task<ImportReport> ImportAsync(ImportSource source, Actor? by = null)
    {
        await using var scope = Store.Host.Services.CreateAsyncScope();
        return await scope.ServiceProvider.GetRequiredService<ClaimIntake>().ImportAsync(source, by ?? Analyst);
    }

    public Task<ImportReport> ImportCsvAsync(string csv, char delimiter = ',', int? maxRows = null) =>
        ImportAsync(Source(IntakeRows.Utf8(csv), ImportFormat.Csv, delimiter, maxRows));

    public static ImportSource Source(byte[] body, ImportFormat format = ImportFormat.Csv, char delimiter = ',', int? maxRows = null) =>
        new("test-input", format, () => new MemoryStream(body, writable: false), delimiter, maxRows);

    /// <summary>Row counts and a SHA-256 over every claim, score, case and driver: equal before and after means nothing changed.</summary>
    public async Task<string> FingerprintAsync()
    {
        await using var db = Store.NewContext();
        var sb = new StringBuilder();
        foreach (var c in await db.Claims.AsNoTracking().OrderBy(c => c.Id).Select(c => new { c.Id, c.ClaimNumber, c.FieldValuesJson, c.State }).ToListAsync())
            sb.Append(c.Id).Append(c.ClaimNumber).Append(c.FieldValuesJson).Append(c.State).Append('\n');
        foreach (var s in await db.ClaimScores.AsNoTracking().OrderBy(s => s.Id).Select(s => new { s.ClaimId, s.Probability, s.DriversJson }).ToListAsync())
            sb.Append(s.ClaimId).Append(s.Probability).Append(s.DriversJson).Append('\n');
        foreach (var c in await db.Cases.AsNoTracking().OrderBy(c => c.Id).Select(c => new { c.ClaimNumber, c.Probability, c.Status }).ToListAsync())
            sb.Append(c.ClaimNumber).Append(c.Probability).Append(c.Status).Append('\n');
        var counts = $"{await db.Claims.CountAsync()}/{await db.ClaimScores.CountAsync()}/{await db.Cases.CountAsync()}/{await db.Drivers.CountAsync()}/{await db.Checks.CountAsync()}";
        return counts + ":" + Convert.ToHexString(SHA256.HashData(Encoding.UTF8.GetBytes(sb.ToString())));
    }

    public async Task<int> AuditCountAsync(string what)
    {
        await using var db = Store.NewContext();
        return await db.AuditEvents.CountAsync(a => a.What == what);
    }
}

/// <summary>The same on a throwaway PostgreSQL database (TRIAGE_TEST_POSTGRES); its tests skip without one.</summary>
public sealed class PostgresIntakeFixture : IntakeFixture
{
    public override string Provider => "Postgres";
}
