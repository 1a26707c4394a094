using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Scoring.Models;

namespace Triage.Cases.Tests.Intake;

public sealed class SqliteIntakeTests(IntakeFixture fixture) : IntakeTests(fixture), IClassFixture<IntakeFixture>;

public sealed class PostgresIntakeTests(PostgresIntakeFixture fixture) : IntakeTests(fixture), IClassFixture<PostgresIntakeFixture>;

/// <summary>Intake on each store provider (the PostgreSQL run skips without TRIAGE_TEST_POSTGRES).</summary>
public abstract class IntakeTests(IntakeFixture fixture)
{
    private const double Threshold = 0.3; // TestStore's Queue:Threshold

    [SkippableFact]
    public async Task Stores_scores_and_queues_every_claim_of_a_valid_file()
    {
        var rows = IntakeRows.Many(120, "OK");
        var report = await fixture.ImportCsvAsync(IntakeRows.Csv(rows));

        Assert.False(report.Rejected, string.Join("\n", report.Errors));
        Assert.Equal((120, 120, 0), (report.Rows, report.Stored, report.Duplicates));
        await using var db = fixture.Store.NewContext();
        var scores = await db.ClaimScores.AsNoTracking().Include(s => s.Claim).Where(s => s.Claim!.ClaimNumber.StartsWith("OK-")).ToListAsync();
        Assert.Equal(120, scores.Count);
        var cases = await db.Cases.AsNoTracking().Include(c => c.Drivers).Where(c => c.ClaimNumber.StartsWith("OK-")).ToListAsync();
        Assert.Equal(report.Queued, cases.Count);
        Assert.Equal(scores.Where(s => s.Probability >= Threshold).Select(s => s.Claim!.ClaimNumber).Order(), cases.Select(c => c.ClaimNumber).Order());
        Assert.All(scores, s => Assert.Equal(s.Queued, s.Probability >= Threshold));
        Assert.All(cases, c => Assert.NotEmpty(c.Drivers));

        var version = await db.ModelVersions.AsNoTracking().SingleAsync(m => m.IsServing);
        var model = ScoringModel.Load(Path.Combine(fixture.Store.Folder, "data", version.FilePath));
        foreach (var s in scores.Take(20))
        {
            // Local accuracy of Shapley attributions (Lundberg et al. 2020, Nature MI 2:56–67): base + Σ drivers = log-odds.
            Assert.Equal(s.LogOdds, s.BaseLogOdds + s.Drivers().Values.Sum(), 1e-9);
            Assert.Equal(ScoringModel.Sigmoid(s.LogOdds), s.Probability, 1e-12);
            // Stored as the serving model explains the same claim now.
            Assert.Equal(model.Explain(s.Claim!.FieldValues()).LogOdds, s.LogOdds, 1e-12);
        }
        Assert.True(await fixture.AuditCountAsync("claims.imported") >= 1);
    }

    [SkippableFact]
    public async Task Sending_the_same_claims_again_changes_nothing_and_reports_duplicates()
    {
        var rows = IntakeRows.Many(15, "DUP");
        Assert.Equal(15, (await fixture.ImportCsvAsync(IntakeRows.Csv(rows))).Stored);
        var before = await fixture.FingerprintAsync();
        // The same numbers written differently (1200.5 vs 1200.50, YES vs yes) are the same claim.
        var again = IntakeRows.Edit(IntakeRows.Csv(rows), 1, "claimed_amount", rows[0]["claimed_amount"] + "0");
        var report = await fixture.ImportCsvAsync(again.Replace(",yes,", ",YES,"));

        Assert.False(report.Rejected, string.Join("\n", report.Errors));
        Assert.Equal((15, 0, 15, 0), (report.Rows, report.Stored, report.Duplicates, report.Queued));
        Assert.Equal(before, await fixture.FingerprintAsync());
    }

    [SkippableFact]
    public async Task Reads_bom_semicolons_quotes_and_json()
    {
        var rows = IntakeRows.Many(3, "FMT");
        rows[0]["claimant_name"] = "Quill; \"Ada\" Fenn";
        var header = string.Join(';', IntakeRows.Header);
        var body = string.Join('\n', [header, .. rows.Select(r => string.Join(';', IntakeRows.Header.Select(h => Quote(r[h]))))]);
        var csv = await fixture.ImportAsync(IntakeFixture.Source([0xEF, 0xBB, 0xBF, .. IntakeRows.Utf8(body + "\r\n")], delimiter: ';'));
        Assert.Equal(3, csv.Stored);
        await using var db = fixture.Store.NewContext();
        var stored = await db.Claims.AsNoTracking().SingleAsync(c => c.ClaimNumber == "FMT-000001");
        Assert.Equal("Quill; \"Ada\" Fenn", stored.FieldValues()["claimant_name"]);

        var json = "[" + string.Join(',', IntakeRows.Many(3, "JS").Select(r =>
            "{" + string.Join(',', r.Where(kv => kv.Value != "").Select(kv => $"\"{kv.Key}\":" + JsonValue(kv.Key, kv.Value!))) + "}")) + "]";
        var fromJson = await fixture.ImportAsync(IntakeFixture.Source(IntakeRows.Utf8(json), ImportFormat.Json));
        Assert.False(fromJson.Rejected, string.Join("\n", fromJson.Errors));
        Assert.Equal(3, fromJson.Stored);
        Assert.Equal("yes", (await db.Claims.AsNoTracking().SingleAsync(c => c.ClaimNumber == "JS-000003")).FieldValues()["police_report"]);
    }

    [SkippableFact]
    public async Task A_claim_sent_twice_at_once_is_stored_once()
    {
        var body = IntakeRows.Csv(IntakeRows.Many(40, "PAR"));
        var reports = await Task.WhenAll(Enumerable.Range(0, 4).Select(_ => Task.Run(() => fixture.ImportCsvAsync(body))));

        Assert.All(reports, r => Assert.False(r.Rejected, string.Join("\n", r.Errors)));
        Assert.Equal(40, reports.Sum(r => r.Stored));
        Assert.Equal(120, reports.Sum(r => r.Duplicates));
        await using var db = fixture.Store.NewContext();
        Assert.Equal(40, await db.Claims.CountAsync(c => c.ClaimNumber.StartsWith("PAR-")));
        Assert.Equal(40, await db.ClaimScores.CountAsync(s => s.Claim!.ClaimNumber.StartsWith("PAR-")));
    }

    [SkippableFact]
    public async Task Files_longer_than_one_batch_are_stored_whole()
    {
        var report = await fixture.ImportCsvAsync(IntakeRows.Csv(IntakeRows.Many(2_300, "BIG")));
        Assert.Equal(2_300, report.Stored);
        await using var db = fixture.Store.NewContext();
        Assert.Equal(2_300, await db.ClaimScores.CountAsync(s => s.Claim!.ClaimNumber.StartsWith("BIG-")));
    }

    [SkippableFact]
    public async Task Every_error_is_counted_but_the_list_stops_at_the_cap()
    {
        var rows = IntakeRows.Many(300, "CAP");
        foreach (var r in rows) r["line"] = "boat";
        var report = await fixture.ImportCsvAsync(IntakeRows.Csv(rows));
        Assert.Equal(300, report.ErrorCount);
        Assert.Equal(200, report.Errors.Count); // IntakeOptions.MaxErrors default
        Assert.Contains("the first 200 listed", report.Summary);
    }

    [SkippableFact]
    public async Task Only_analysts_and_admins_may_import()
    {
        var before = await fixture.FingerprintAsync();
        var investigator = new Actor("id-inv", "inv", new HashSet<string> { Roles.Investigator });
        var e = await Assert.ThrowsAsync<AccessDeniedException>(() =>
            fixture.ImportAsync(IntakeFixture.Source(IntakeRows.Utf8(IntakeRows.Csv(IntakeRows.Many(2, "ROLE")))), investigator));
        Assert.Contains("Analyst or Admin", e.Message);
        Assert.Equal(before, await fixture.FingerprintAsync());
    }

    private static string Quote(string? v) => v is null ? "" : v.Contains(';') || v.Contains('"') ? "\"" + v.Replace("\"", "\"\"") + "\"" : v;

    private static string JsonValue(string field, string v) =>
        IntakeRows.Schema.Field(field).Type switch
        {
            Triage.Scoring.Schema.FieldType.Number => v,
            Triage.Scoring.Schema.FieldType.YesNo => v == "yes" ? "true" : "false",
            _ => $"\"{v}\"",
        };
}
