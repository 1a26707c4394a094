using System.Globalization;
using Triage.Cli.Demo;
using Triage.Scoring.Schema;

namespace Triage.Cli.Tests.Demo;

/// <summary>The written files keep the schema contract: columns, types, ranges, categories and date order.</summary>
public sealed class DemoSchemaTests
{
    private static readonly ClaimSchema Schema = ClaimSchema.Load(Path.Combine(DemoRun.CommittedFolder, DemoWriter.SchemaFile));
    private static readonly DateOnly AsOf = DemoScenario.AsOfDate;

    [Fact]
    public void Schema_built_in_code_equals_the_committed_contract()
    {
        Assert.Equal(Schema.ToJson(), DemoSchema.Build().ToJson());
        var written = ClaimSchema.Load(Path.Combine(DemoRun.Default, DemoWriter.SchemaFile));
        Assert.Equal(Schema.ToJson(), written.ToJson());
    }

    [Fact]
    public void Protected_age_band_is_not_a_feature()
    {
        Assert.True(Schema.Field("claimant_age_band").Protected);
        Assert.DoesNotContain("claimant_age_band", Schema.FeatureNames);
    }

    [Fact]
    public void History_columns_are_the_schema_fields_then_outcome_closed_date_and_planted()
    {
        var header = File.ReadLines(Path.Combine(DemoRun.Default, DemoWriter.HistoryFile)).First().Split(',');
        Assert.Equal([.. Schema.Fields.Select(f => f.Name), "outcome", "closed_date", "_planted"], header);
        var openHeader = File.ReadLines(Path.Combine(DemoRun.Default, DemoWriter.OpenFile)).First().Split(',');
        Assert.Equal([.. Schema.Fields.Select(f => f.Name), "_planted"], openHeader);
    }

    [Theory]
    [InlineData(DemoWriter.HistoryFile)]
    [InlineData(DemoWriter.OpenFile)]
    public void Every_value_is_valid_for_its_field(string file)
    {
        var rows = DemoRun.ReadCsv(Path.Combine(DemoRun.Default, file));
        for (var r = 0; r < rows.Count; r++)
            foreach (var field in Schema.Fields)
            {
                var problem = Problem(field, rows[r][field.Name]);
                Assert.True(problem is null, $"{file} row {r + 2} column {field.Name}: {problem}");
            }
    }

    [Fact]
    public void Claim_numbers_are_unique_across_history_and_open_claims()
    {
        var numbers = DemoRun.ReadCsv(Path.Combine(DemoRun.Default, DemoWriter.HistoryFile))
            .Concat(DemoRun.ReadCsv(Path.Combine(DemoRun.Default, DemoWriter.OpenFile)))
            .Select(r => r["claim_number"]).ToList();
        Assert.Equal(numbers.Count, numbers.Distinct().Count());
        Assert.All(numbers, n => Assert.Matches(@"^LM-\d{2}-\d{6}$", n));
    }

    [Fact]
    public void History_dates_run_policy_start_loss_report_close_within_three_years()
    {
        var rows = DemoRun.ReadCsv(Path.Combine(DemoRun.Default, DemoWriter.HistoryFile));
        Assert.True(rows.Count >= 20_000, $"{rows.Count} history rows");
        foreach (var row in rows)
        {
            var (start, loss, report) = (Date(row["policy_start_date"]), Date(row["loss_date"]), Date(row["report_date"]));
            var closed = Date(row["closed_date"]);
            Assert.True(start <= loss && loss <= report && report < closed && closed <= AsOf, row["claim_number"]);
            Assert.True(report >= AsOf.AddYears(-3), row["claim_number"]);
            Assert.Contains(row["outcome"], new[] { "confirmed_fraud", "not_fraud" });
        }
    }

    [Fact]
    public void Open_claims_were_reported_in_the_last_ten_days()
    {
        var rows = DemoRun.ReadCsv(Path.Combine(DemoRun.Default, DemoWriter.OpenFile));
        Assert.True(rows.Count >= 800, $"{rows.Count} open rows");
        foreach (var row in rows)
        {
            var (start, loss, report) = (Date(row["policy_start_date"]), Date(row["loss_date"]), Date(row["report_date"]));
            Assert.True(start <= loss && loss <= report, row["claim_number"]);
            Assert.InRange(report, AsOf.AddDays(-9), AsOf);
        }
    }

    [Fact]
    public void Line_specific_fields_are_missing_where_they_do_not_apply()
    {
        var causes = new Dictionary<string, string[]>
        {
            ["motor"] = ["collision", "theft", "vandalism", "windscreen", "fire"],
            ["home"] = ["fire", "water", "storm", "burglary", "accidental_damage"],
            ["travel"] = ["baggage_loss", "medical", "cancellation", "theft"],
        };
        foreach (var row in DemoRun.ReadCsv(Path.Combine(DemoRun.Default, DemoWriter.HistoryFile)))
        {
            var line = row["line"];
            Assert.Contains(row["loss_cause"], causes[line]);
            Assert.Equal(line == "motor", row["vehicle_age_years"] != "");
            if (line == "travel") Assert.Equal("", row["repairer_code"]);
            if (row["loss_cause"] == "cancellation") Assert.Equal("", row["loss_hour"]);
            Assert.Equal(row["loss_cause"] is "theft" or "burglary" or "vandalism", row["police_report"] != "");
        }
    }

    private static DateOnly Date(string s) => DateOnly.ParseExact(s, "yyyy-MM-dd", CultureInfo.InvariantCulture);

    private static string? Problem(FieldSpec field, string value)
    {
        if (value == "") return field.MissingAllowed ? null : "missing but the field does not allow it";
        switch (field.Type)
        {
            case FieldType.Number:
                if (!double.TryParse(value, NumberStyles.AllowDecimalPoint | NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var n))
                    return $"'{value}' is not an invariant number";
                if (n < field.Min || n > field.Max) return $"{n} outside [{field.Min}, {field.Max}]";
                return null;
            case FieldType.Category:
                return field.Categories!.Contains(value) ? null : $"'{value}' is not a declared category";
            case FieldType.YesNo:
                return value is "yes" or "no" ? null : $"'{value}' is not yes/no";
            case FieldType.Date:
                return DateOnly.TryParseExact(value, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out _) ? null : $"'{value}' is not yyyy-MM-dd";
            default:
                return null;
        }
    }
}
