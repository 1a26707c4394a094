using System.Globalization;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cases.Hosting;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.Export.OutcomeFiles;

namespace Triage.Cases.Tests.Export;

/// <summary>Exports read back with CsvHelper 34.0.0 and Parquet.Net 6.1.0; expectations come straight from the store.</summary>
public sealed class OutcomeExportTests(ExportStore s) : IClassFixture<ExportStore>
{
    private static readonly string[] Fixed =
        ["claim_number", "line_of_business", "case_opened_at", "verdict_at", "outcome", "label", "score", "model_version", "audit_sample", "selection_probability"];

    [Fact]
    public async Task Csv_has_one_row_per_decided_case_with_its_label_score_and_snapshot()
    {
        var closed = (await s.ClosedAsync()).Where(x => x.Verdict.Outcome != VerdictOutcome.Inconclusive).ToList();
        Assert.NotEmpty(closed);
        var (header, rows) = ReadCsv(await s.ExportAsync(new ExportFilter(), ExportFormat.Csv));

        var schema = Triage.Scoring.Schema.ClaimSchema.Load(Path.Combine(s.Store.Folder, "seed", "schema.json"));
        Assert.Equal([.. Fixed, .. schema.FeatureNames], header);
        Assert.Equal(closed.Count, rows.Count);
        var byNumber = rows.ToDictionary(r => r["claim_number"]);
        foreach (var (c, v) in closed)
        {
            var row = byNumber[c.ClaimNumber];
            Assert.Equal(v.Outcome == VerdictOutcome.ConfirmedFraud ? "1" : "0", row["label"]);
            Assert.Equal(v.Outcome == VerdictOutcome.ConfirmedFraud ? "confirmed_fraud" : "not_fraud", row["outcome"]);
            Assert.Equal(c.Probability, double.Parse(row["score"], CultureInfo.InvariantCulture));
            Assert.Equal(v.At, DateTime.Parse(row["verdict_at"], CultureInfo.InvariantCulture, DateTimeStyles.AdjustToUniversal));
            Assert.Equal("v1", row["model_version"]);
            Assert.Equal(c.Line, row["line_of_business"]);
            AssertSnapshot(c.ScoredValues(), row);
        }
    }

    [Fact]
    public async Task Parquet_has_typed_columns_and_the_same_rows_as_csv()
    {
        var csv = ReadCsv(await s.ExportAsync(new ExportFilter(IncludeInconclusive: true), ExportFormat.Csv)).Rows;
        var (fields, columns) = await ReadParquetAsync(await s.ExportAsync(new ExportFilter(IncludeInconclusive: true), ExportFormat.Parquet));

        Assert.Equal(csv.Count, columns["claim_number"].Count);
        var type = fields.ToDictionary(f => f.Name, f => (f.ClrType, f.IsNullable));
        Assert.Equal((typeof(int), true), type["label"]);
        Assert.Equal((typeof(double), false), type["score"]);
        Assert.Equal((typeof(bool), false), type["audit_sample"]);
        Assert.Equal((typeof(double), false), type["selection_probability"]);
        Assert.Equal((typeof(double), true), type["claimed_amount"]);
        Assert.Equal((typeof(double), true), type["days_loss_to_report"]);
        Assert.Equal((typeof(bool), true), type["police_report"]);
        Assert.True(IsText(fields.Single(f => f.Name == "repairer_code")));
        Assert.True(IsText(fields.Single(f => f.Name == "claim_number")));
        Assert.Equal(typeof(DateTime), type["verdict_at"].ClrType);

        for (var i = 0; i < csv.Count; i++)
        {
            var row = csv[i];
            Assert.Equal(row["claim_number"], columns["claim_number"][i]);
            Assert.Equal(row["label"] == "" ? null : int.Parse(row["label"], CultureInfo.InvariantCulture), (int?)columns["label"][i]);
            Assert.Equal(double.Parse(row["score"], CultureInfo.InvariantCulture), (double)columns["score"][i]!);
            Assert.Equal(row["claimed_amount"] == "" ? null : double.Parse(row["claimed_amount"], CultureInfo.InvariantCulture), (double?)columns["claimed_amount"][i]);
            Assert.Equal(row["police_report"] switch { "true" => true, "false" => (bool?)false, _ => null }, (bool?)columns["police_report"][i]);
            Assert.Equal(row["repairer_code"] == "" ? null : row["repairer_code"], columns["repairer_code"][i]);
            Assert.Equal(DateTime.Parse(row["verdict_at"], CultureInfo.InvariantCulture, DateTimeStyles.AdjustToUniversal), ((DateTime)columns["verdict_at"][i]!).ToUniversalTime());
        }
    }

    [Fact]
    public async Task Audit_sample_cases_carry_their_flag_and_selection_probability()
    {
        var closed = (await s.ClosedAsync()).Where(x => x.Verdict.Outcome != VerdictOutcome.Inconclusive).ToDictionary(x => x.Case.ClaimNumber, x => x.Case);
        Assert.Contains(closed.Values, c => c.IsAuditSample);
        Assert.Contains(closed.Values, c => !c.IsAuditSample);
        var csv = ReadCsv(await s.ExportAsync(new ExportFilter(), ExportFormat.Csv)).Rows;
        Assert.All(csv, r =>
        {
            var c = closed[r["claim_number"]];
            Assert.Equal(c.IsAuditSample ? "true" : "false", r["audit_sample"]);
            Assert.Equal(c.IsAuditSample ? ExportStore.AuditShare : 1.0, double.Parse(r["selection_probability"], CultureInfo.InvariantCulture));
        });
        var (_, columns) = await ReadParquetAsync(await s.ExportAsync(new ExportFilter(), ExportFormat.Parquet));
        var flags = columns["claim_number"].Zip(columns["audit_sample"], columns["selection_probability"]).ToList();
        Assert.All(flags, f => Assert.Equal((closed[(string)f.First!].IsAuditSample, closed[(string)f.First!].SelectionProbability), ((bool)f.Second!, (double)f.Third!)));
    }

    [Fact]
    public async Task Inconclusive_verdicts_come_only_when_asked_for_with_no_label()
    {
        var inconclusive = (await s.ClosedAsync()).Count(x => x.Verdict.Outcome == VerdictOutcome.Inconclusive);
        Assert.True(inconclusive > 0, "the demo history turns some verdicts inconclusive");
        var without = ReadCsv(await s.ExportAsync(new ExportFilter(), ExportFormat.Csv)).Rows;
        var with = ReadCsv(await s.ExportAsync(new ExportFilter(IncludeInconclusive: true), ExportFormat.Csv)).Rows;
        Assert.DoesNotContain(without, r => r["outcome"] == "inconclusive");
        Assert.Equal(without.Count + inconclusive, with.Count);
        Assert.All(with.Where(r => r["outcome"] == "inconclusive"), r => Assert.Equal("", r["label"]));
        Assert.Equal(inconclusive, with.Count(r => r["label"] == ""));
    }

    [Fact]
    public async Task The_snapshot_is_exported_even_after_the_claim_changed()
    {
        var (c, _) = (await s.ClosedAsync()).First(x => x.Verdict.Outcome != VerdictOutcome.Inconclusive);
        var snapshot = c.ScoredValues();
        await using (var db = s.Store.NewContext())
        {
            // Claims cannot change through the app; a direct write stands in for a later correction in the claims system.
            var claim = await db.Claims.SingleAsync(x => x.Id == c.ClaimId);
            var changed = claim.FieldValues().ToDictionary(p => p.Key, p => p.Value);
            changed["claimed_amount"] = "999999";
            changed["police_report"] = "yes";
            await db.Claims.Where(x => x.Id == c.ClaimId)
                .ExecuteUpdateAsync(u => u.SetProperty(x => x.FieldValuesJson, System.Text.Json.JsonSerializer.Serialize(changed)));
        }
        var row = ReadCsv(await s.ExportAsync(new ExportFilter(), ExportFormat.Csv)).Rows.Single(r => r["claim_number"] == c.ClaimNumber);
        Assert.NotEqual("999999", row["claimed_amount"]);
        AssertSnapshot(snapshot, row);
    }

    [Fact]
    public async Task An_amended_verdict_exports_once_as_its_latest()
    {
        var (c, first) = (await s.ClosedAsync()).First(x => x.Verdict.Outcome == VerdictOutcome.NotFraud);
        var amendedAt = first.At.AddDays(3);
        await using (var db = s.Store.NewContext())
        {
            var tracked = await db.Cases.Include(x => x.Claim).Include(x => x.Verdicts).SingleAsync(x => x.Id == c.Id);
            tracked.AmendVerdict(VerdictOutcome.ConfirmedFraud, "late evidence", null, null, ExportStore.Analyst, amendedAt);
            await db.SaveChangesAsync();
        }
        var rows = ReadCsv(await s.ExportAsync(new ExportFilter(), ExportFormat.Csv)).Rows.Where(r => r["claim_number"] == c.ClaimNumber).ToList();
        var row = Assert.Single(rows);
        Assert.Equal("1", row["label"]);
        Assert.Equal(amendedAt, DateTime.Parse(row["verdict_at"], CultureInfo.InvariantCulture, DateTimeStyles.AdjustToUniversal));
    }

    [Fact]
    public async Task Filters_by_verdict_date_line_and_model_and_the_count_preview_agrees()
    {
        var closed = (await s.ClosedAsync()).Where(x => x.Verdict.Outcome != VerdictOutcome.Inconclusive).ToList();
        var days = closed.Select(x => DateOnly.FromDateTime(x.Verdict.At)).Order().ToList();
        var (from, to) = (days[days.Count / 4], days[days.Count * 3 / 4]);
        var inRange = closed.Count(x => DateOnly.FromDateTime(x.Verdict.At) >= from && DateOnly.FromDateTime(x.Verdict.At) <= to);
        var dated = new ExportFilter(from, to);
        Assert.Equal(inRange, ReadCsv(await s.ExportAsync(dated, ExportFormat.Csv)).Rows.Count);
        Assert.Equal(inRange, await s.Service().CountAsync(ExportStore.Analyst, dated, default));

        var motor = ReadCsv(await s.ExportAsync(new ExportFilter(Line: "motor"), ExportFormat.Csv)).Rows;
        Assert.Equal(closed.Count(x => x.Case.Line == "motor"), motor.Count);
        Assert.All(motor, r => Assert.Equal("motor", r["line_of_business"]));

        Assert.Empty(ReadCsv(await s.ExportAsync(new ExportFilter(ModelVersion: "v9"), ExportFormat.Csv)).Rows);
        Assert.Equal(closed.Count, await s.Service().CountAsync(ExportStore.Analyst, new ExportFilter(ModelVersion: "v1"), default));
        // An empty Parquet export still carries its columns.
        var (fields, columns) = await ReadParquetAsync(await s.ExportAsync(new ExportFilter(ModelVersion: "v9"), ExportFormat.Parquet));
        Assert.Contains(fields, f => f.Name == "claimed_amount");
        Assert.Empty(columns["score"]);
    }

    [Fact]
    public async Task Pseudonyms_replace_claim_numbers_stably_and_keep_the_rest()
    {
        var plain = ReadCsv(await s.ExportAsync(new ExportFilter(), ExportFormat.Csv)).Rows;
        var (header, once) = ReadCsv(await s.ExportAsync(new ExportFilter(Pseudonymise: true), ExportFormat.Csv));
        var twice = ReadCsv(await s.ExportAsync(new ExportFilter(Pseudonymise: true), ExportFormat.Csv)).Rows;

        Assert.Equal("claim_pseudonym", header[0]);
        Assert.DoesNotContain("claim_number", header);
        Assert.Equal(once.Select(r => r["claim_pseudonym"]), twice.Select(r => r["claim_pseudonym"]));
        Assert.All(once.Zip(plain), p =>
        {
            Assert.NotEqual(p.Second["claim_number"], p.First["claim_pseudonym"]);
            Assert.DoesNotContain(p.Second["claim_number"], p.First["claim_pseudonym"]);
            Assert.Matches("^ps-[0-9a-f]{24}$", p.First["claim_pseudonym"]);
            Assert.Equal(p.Second["claimed_amount"], p.First["claimed_amount"]);
        });
        Assert.Equal(once.Count, once.Select(r => r["claim_pseudonym"]).Distinct().Count());

        // The key lives in the data folder: a new instance (a restart) reads it and gives the same pseudonyms.
        var paths = s.Store.Host.Services.GetRequiredService<TriagePaths>();
        Assert.True(File.Exists(Path.Combine(paths.DataFolder, Pseudonyms.KeyFileName)));
        var again = new Pseudonyms(paths);
        Assert.Equal(once[0]["claim_pseudonym"], again.Of("claim_number", plain[0]["claim_number"]));
        Assert.NotEqual(again.Of("claim_number", "LM-1"), again.Of("policy_number", "LM-1"));
    }

    [Fact]
    public async Task A_key_in_another_data_folder_gives_other_pseudonyms_and_a_damaged_key_is_refused()
    {
        var folder = Directory.CreateTempSubdirectory("triage-key-").FullName;
        try
        {
            var config = new ConfigurationBuilder()
                .AddInMemoryCollection(new Dictionary<string, string?> { ["Triage:Home"] = folder }).Build();
            var paths = new TriagePaths(config, Microsoft.Extensions.Options.Options.Create(new Options.StorageOptions { DataFolder = folder }),
                Microsoft.Extensions.Options.Options.Create(new Options.DemoOptions()));
            var other = new Pseudonyms(paths).Of("claim_number", "LM-26-000001");
            var ours = s.Store.Host.Services.GetRequiredService<Pseudonyms>().Of("claim_number", "LM-26-000001");
            Assert.NotEqual(ours, other);

            await File.WriteAllTextAsync(Path.Combine(folder, Pseudonyms.KeyFileName), "not base64!");
            var e = Assert.Throws<InvalidDataException>(() => new Pseudonyms(paths).Of("claim_number", "x"));
            Assert.Contains("is damaged", e.Message);
        }
        finally { Directory.Delete(folder, recursive: true); }
    }

    [Fact]
    public async Task Only_analysts_and_admins_may_export_and_every_export_is_audited()
    {
        foreach (var role in new[] { Roles.Investigator, Roles.Manager, Roles.TeamLead })
        {
            var who = new Actor("x", "someone", new HashSet<string> { role });
            var e = await Assert.ThrowsAsync<AccessDeniedException>(() => s.Service().PrepareAsync(who, new ExportFilter(), default));
            Assert.Contains("Analyst or Admin", e.Message);
            await Assert.ThrowsAsync<AccessDeniedException>(() => s.Service().CountAsync(who, new ExportFilter(), default));
        }
        var admin = new Actor("id-admin", "ada.admin", new HashSet<string> { Roles.Admin });
        var filter = new ExportFilter(Line: "home", Pseudonymise: true);
        var rows = ReadCsv(await s.ExportAsync(filter, ExportFormat.Csv, admin)).Rows.Count;

        await using var db = s.Store.NewContext();
        var audit = await db.AuditEvents.Where(a => a.What == "outcomes.exported" && a.Who == "ada.admin").ToListAsync();
        var entry = Assert.Single(audit);
        Assert.Equal($"csv, all verdict dates, line home, all models, inconclusive left out, pseudonymised: {rows} row(s)", entry.Detail);
    }

    /// <summary>Every snapshot value, typed the way the export types it.</summary>
    private static void AssertSnapshot(IReadOnlyDictionary<string, string?> snapshot, Dictionary<string, string> row)
    {
        Assert.NotEmpty(snapshot);
        foreach (var (field, value) in snapshot)
        {
            var exported = row[field];
            if (value is null) Assert.Equal("", exported);
            else if (value is "yes" or "no") Assert.Equal(value == "yes" ? "true" : "false", exported);
            else if (double.TryParse(value, NumberStyles.Float, CultureInfo.InvariantCulture, out var d))
                Assert.Equal(d, double.Parse(exported, CultureInfo.InvariantCulture));
            else Assert.Equal(value, exported);
        }
    }
}
