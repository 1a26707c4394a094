using System.Data.Common;
using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Storage;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.FirstStart;
using Triage.Cases.Intake;
using Triage.Cases.Store;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Intake;

public sealed class SqliteStoredRowsTests(IntakeFixture fixture) : StoredRowsTests(fixture), IClassFixture<IntakeFixture>;

public sealed class PostgresStoredRowsTests(PostgresIntakeFixture fixture) : StoredRowsTests(fixture), IClassFixture<PostgresIntakeFixture>;

/// <summary>
/// Intake's fast store path writes, column for column, the rows EF Core's SaveChanges (10.0.15, the
/// reference here) writes for the same entities: same types, date and GUID formats, converted enums.
/// </summary>
public abstract class StoredRowsTests(IntakeFixture fixture)
{
    [SkippableFact]
    public async Task A_claim_its_score_and_its_case_are_the_rows_SaveChanges_writes()
    {
        var store = fixture.Store;
        await using var scope = store.Host.Services.CreateAsyncScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        var (version, model) = await scope.ServiceProvider.GetRequiredService<ServingModels>().CurrentAsync(db, default);
        var playbook = await db.PlaybookRules.AsNoTracking().ToListAsync();
        var values = IntakeRows.Valid(7, "ROWS");
        values["loss_date"] = "2027-02-10"; // long before the report: a raising driver, so the playbook adds checks
        var twin = new Dictionary<string, string?>(values) { ["claim_number"] = "TWIN-000007" };
        var scored = CaseOpener.Score(model, [(SeedClaims.ToClaim(model.Schema, values), values), (SeedClaims.ToClaim(model.Schema, twin), twin)], default);
        var at = TestStore.Today.UtcDateTime;
        Case Open(ScoredClaim s) => CaseOpener.Open(s, version.Version, playbook, at, 5, IntakeFixture.Analyst);
        ClaimScore Score(ScoredClaim s) => ClaimScore.Record(s.Claim, s.Explanation, version.Version, true, at);

        await using (var tx = await db.Database.BeginTransactionAsync())
        {
            using var writer = new ScoredClaimWriter(db);
            await writer.WriteAsync(scored[0].Claim, Score(scored[0]), Open(scored[0]), default);
            await tx.CommitAsync();
        }
        await using (var ef = store.NewContext())
        {
            var c = Open(scored[1]);
            ef.Cases.Add(c);
            ef.Add(Score(scored[1]));
            await ef.SaveChangesAsync();
        }

        var fast = await db.Cases.AsNoTracking().SingleAsync(c => c.ClaimNumber == "ROWS-000007");
        var reference = await db.Cases.AsNoTracking().SingleAsync(c => c.ClaimNumber == "TWIN-000007");
        Assert.NotEmpty(await db.Checks.Where(c => c.CaseId == fast.Id).ToListAsync());
        var conn = db.Database.GetDbConnection();
        foreach (var (table, column, fastId, referenceId) in new[]
        {
            ("Claims", "Id", fast.ClaimId, reference.ClaimId),
            ("ClaimScores", "ClaimId", fast.ClaimId, reference.ClaimId),
            ("Cases", "Id", fast.Id, reference.Id),
            ("Drivers", "CaseId", fast.Id, reference.Id),
            ("Checks", "CaseId", fast.Id, reference.Id),
            ("AuditEvents", "CaseId", fast.Id, reference.Id),
        })
        {
            var a = await RowsAsync(conn, table, column, fastId);
            var b = await RowsAsync(conn, table, column, referenceId);
            Assert.True(a.Count > 0, $"{table}: no rows");
            Assert.Equal(b.Count, a.Count);
            for (var i = 0; i < a.Count; i++)
                foreach (var (name, value) in b[i])
                    Assert.True(Same(name, value, a[i][name]), $"{table}.{name}: SaveChanges wrote {Show(value)}, intake wrote {Show(a[i][name])}");
        }
    }

    private static async Task<List<Dictionary<string, object?>>> RowsAsync(DbConnection conn, string table, string column, int id)
    {
        if (conn.State != System.Data.ConnectionState.Open) await conn.OpenAsync();
        await using var cmd = conn.CreateCommand();
        cmd.CommandText = $"SELECT * FROM \"{table}\" WHERE \"{column}\" = {id} ORDER BY \"Id\"";
        await using var reader = await cmd.ExecuteReaderAsync();
        var rows = new List<Dictionary<string, object?>>();
        while (await reader.ReadAsync())
            rows.Add(Enumerable.Range(0, reader.FieldCount).ToDictionary(reader.GetName, i => reader.IsDBNull(i) ? null : reader.GetValue(i)));
        return rows;
    }

    // Keys differ by nature; the claim number differs by construction; a GUID is new per case but keeps its form.
    private static bool Same(string column, object? reference, object? fast) => column switch
    {
        "Id" or "ClaimId" or "CaseId" => reference?.GetType() == fast?.GetType(),
        "Version" => reference?.GetType() == fast?.GetType() && Form(reference) == Form(fast),
        _ => Equals(Twin(reference), Twin(fast)),
    };

    private static object? Twin(object? v) => v is string s ? s.Replace("ROWS-000007", "TWIN-000007") : v;

    private static (bool, bool, bool) Form(object? v) =>
        v?.ToString() is { } s ? (Guid.TryParse(s, out _), s == s.ToUpperInvariant(), s == s.ToLowerInvariant()) : default;

    private static string Show(object? v) => v is null ? "NULL" : $"{v} ({v.GetType().Name})";
}
