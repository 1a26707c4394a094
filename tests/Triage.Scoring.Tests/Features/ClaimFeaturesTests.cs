using Microsoft.Extensions.Options;
using Triage.Scoring.Features;
using Triage.Scoring.Schema;
using Triage.Scoring.Tests.Support;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Features;

public class ClaimFeaturesTests
{
    private static readonly ClaimFeatures Features = new(SyntheticClaims.Schema);

    private static Dictionary<string, string?> Claim() => new(SyntheticClaims.Generate(1, seed: 1)[0].Values);

    [Fact]
    public void Every_column_keeps_its_field_and_only_feature_fields_are_used()
    {
        // Reference: seed-cases/schema.json — one column per number/yes-no feature, one per category level, one per derived value.
        var schema = SyntheticClaims.Schema;
        Assert.Equal(schema.FeatureNames, Features.Fields);
        Assert.DoesNotContain("claimant_age_band", Features.Fields);
        Assert.DoesNotContain("policy_limit", Features.Fields);
        var expectedColumns = schema.Fields.Where(f => f.Feature).Sum(f => f.Type == FieldType.Category ? f.Categories!.Count : 1)
            + schema.Derived.Count(d => d.Feature);
        Assert.Equal(expectedColumns, Features.Count);
        Assert.Equal(40, Features.Columns.Count(c => c.Field == "repairer_code"));
        Assert.All(Features.Columns, c => Assert.Contains(c.Field, Features.Fields));
    }

    [Fact]
    public void Encodes_numbers_levels_yes_no_and_derived_dates()
    {
        var c = Claim();
        c["line"] = "home";
        c["loss_hour"] = "";
        c["police_report"] = "no";
        c["repairer_code"] = "RP-99"; // unknown level
        c["policy_start_date"] = "2024-01-31";
        c["loss_date"] = "2024-03-01";
        c["report_date"] = "2024-03-15";
        c["claimed_amount"] = "2500.5";
        c["policy_limit"] = "10000";
        var x = Features.Encode(c);
        double At(string column) => x[Features.Columns.ToList().FindIndex(k => k.Name == column)];

        Assert.Equal(1.0, At("line=home"));
        Assert.Equal(0.0, At("line=motor"));
        Assert.True(double.IsNaN(At("loss_hour")));
        Assert.Equal(0.0, At("police_report"));
        Assert.All(Features.Columns.Select((col, i) => (col, i)).Where(p => p.col.Field == "repairer_code"), p => Assert.Equal(0.0, x[p.i]));
        // 2024 is a leap year: 31 Jan → 1 Mar is 30 days (ISO 8601 calendar), 1 Mar → 15 Mar is 14.
        Assert.Equal(30.0, At("days_policy_start_to_loss"));
        Assert.Equal(14.0, At("days_loss_to_report"));
        Assert.Equal(31.0, At("policy_start_day_of_month"));
        Assert.Equal((float)0.25005, At("amount_to_limit_ratio"));
        Assert.Equal(2500.5, At("claimed_amount"));
    }

    [Fact]
    public void Ratio_over_zero_is_missing()
    {
        var c = Claim();
        c["policy_limit"] = "0";
        Assert.True(double.IsNaN(Features.Encode(c)[Features.Columns.ToList().FindIndex(k => k.Name == "amount_to_limit_ratio")]));
    }

    [Theory]
    [InlineData("claimed_amount", "12,5", "Field 'claimed_amount': '12,5' is not a number")]
    [InlineData("police_report", "maybe", "Field 'police_report': 'maybe' is not 'yes' or 'no'")]
    [InlineData("loss_date", "03/01/2024", "Field 'loss_date': '03/01/2024' is not a date")]
    public void Bad_values_name_the_field(string field, string value, string message)
    {
        var c = Claim();
        c[field] = value;
        var e = Assert.Throws<InvalidDataException>(() => Features.Encode(c));
        Assert.StartsWith(message, e.Message);
    }

    [Fact]
    public void A_protected_field_used_as_a_feature_is_refused_by_name()
    {
        var schema = SyntheticClaims.Schema;
        var leaky = schema with
        {
            Fields = [.. schema.Fields.Select(f => f.Name == "claimant_age_band" ? f with { Feature = true } : f)],
        };
        var e = Assert.Throws<ProtectedFieldException>(() => new ClaimFeatures(leaky));
        Assert.Equal("claimant_age_band", e.Field);
        Assert.Contains("'claimant_age_band'", e.Message);
        var trainer = new ModelTrainer(Options.Create(new ScoringOptions()));
        var viaTraining = Assert.Throws<ProtectedFieldException>(() =>
            trainer.Train(leaky, SyntheticClaims.Generate(50, 2), new TrainingRequest("v")));
        Assert.Contains("'claimant_age_band'", viaTraining.Message);
    }

    [Fact]
    public void Linear_imputation_uses_training_means_and_an_indicator_of_the_same_field()
    {
        double[][] rows = [[1, double.NaN], [3, 4], [5, 8]];
        var imputation = Imputation.Fit(rows, 2);
        Assert.Equal([3.0, 6.0], imputation.Means);
        Assert.Equal([1], imputation.IndicatorOf);
        var y = new double[3];
        imputation.Apply([double.NaN, double.NaN], y);
        Assert.Equal([3.0, 6.0, 1.0], y);
        var columns = imputation.IndicatorColumns([new FeatureColumn("a", "a", ColumnKind.Number), new FeatureColumn("b", "b", ColumnKind.Number)]).Single();
        Assert.Equal(("b:missing", "b", ColumnKind.MissingIndicator), (columns.Name, columns.Field, columns.Kind));
    }
}
