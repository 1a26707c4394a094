using Triage.Scoring.Drivers;
using Triage.Scoring.Models;
using Triage.Scoring.Tests.Support;

namespace Triage.Scoring.Tests.Drivers;

[Collection(TrainedModelsCollection.Name)]
public class ExplanationTests(TrainedModels models)
{
    [Theory]
    [InlineData(TrainerKind.FastTree)]
    [InlineData(TrainerKind.FastForest)]
    [InlineData(TrainerKind.Lbfgs)]
    public void Drivers_are_fields_that_add_up_to_the_log_odds(TrainerKind kind)
    {
        // Local accuracy (Lundberg & Lee 2017, Property 1): base + Σ field contributions = log-odds.
        var model = models[kind];
        foreach (var claim in models.Rows.Take(400).Select(r => r.Values))
        {
            var e = model.Explain(claim);
            Assert.Equal(model.Fields.Order(), e.Drivers.Select(d => d.Field).Order());
            Assert.Equal(e.LogOdds, e.BaseValue + e.Drivers.Sum(d => d.Contribution), 1e-9 * Math.Max(1, Math.Abs(e.LogOdds)));
            Assert.Equal(1 / (1 + Math.Exp(-e.LogOdds)), e.Probability, 1e-12);
            Assert.Equal(model.Probability(claim), e.Probability, 1e-12);
            Assert.Equal(e.Drivers.Select(d => d.Contribution).OrderDescending(), e.Drivers.Select(d => d.Contribution));
            // Probability points share out the whole change from the base probability.
            Assert.Equal(100 * (e.Probability - ScoringModel.Sigmoid(e.BaseValue)), e.Drivers.Sum(d => d.EffectPoints), 1e-9);
        }
    }

    [Fact]
    public void Column_attributions_are_summed_back_to_their_field()
    {
        var model = models[TrainerKind.FastTree];
        var claim = models.Rows[3].Values;
        var x = model.Layout.Encode(claim);
        var phi = new double[x.Length];
        model.ExplainColumns(x, phi);
        var e = model.Explain(claim);
        var repairer = model.Layout.Columns.Select((c, i) => (c, i)).Where(p => p.c.Field == "repairer_code").Sum(p => phi[p.i]);
        Assert.Equal(repairer, e["repairer_code"].Contribution, 1e-12);
    }

    [Fact]
    public void Base_value_is_the_expected_log_odds_over_training_rows()
    {
        // For linear models E[w·x + b] = w·E[x] + b exactly; check it against the mean over the rows.
        var model = models[TrainerKind.Lbfgs];
        var split = models.Rows.Where(r => DateOnly.Parse(r.Values["report_date"]!) <= DateOnly.Parse(models.Rows.Max(q => q.Values["report_date"])!).AddMonths(-6)).ToList();
        Assert.Equal(model.Metadata.TrainingRows, split.Count);
        var mean = split.Average(r => model.LogOdds(model.Layout.Encode(r.Values)));
        Assert.Equal(mean, model.BaseValue, 1e-5);
    }

    [Fact]
    public void Late_report_is_worded_against_the_training_quartiles()
    {
        var model = models[TrainerKind.FastTree];
        var claim = new Dictionary<string, string?>(models.Rows[0].Values) { ["loss_date"] = "2025-01-01", ["report_date"] = "2025-02-11" };
        var d = model.Explain(claim)["days_loss_to_report"];
        var stats = model.Stats.Single(s => s.Field == "days_loss_to_report");
        Assert.Equal("41 days", d.ValueText);
        Assert.Equal("Days from loss to report", d.DisplayName);
        Assert.Equal($"higher than three in four claims; the middle half of claims lies between {DriverWording.Format(stats.Q1!.Value, "days")} and {DriverWording.Format(stats.Q3!.Value, "days")}", d.Comparison);
    }

    [Fact]
    public void Missing_and_category_values_are_worded_with_shares()
    {
        var model = models[TrainerKind.FastTree];
        var claim = new Dictionary<string, string?>(models.Rows[0].Values) { ["repairer_code"] = null, ["police_report"] = "no", ["line"] = "motor" };
        var e = model.Explain(claim);
        var repairerMissing = model.Stats.Single(s => s.Field == "repairer_code").MissingShare;
        Assert.Equal(DriverWording.NotGiven, e["repairer_code"].ValueText);
        Assert.Equal($"none given; {DriverWording.Share(repairerMissing)} of claims give none", e["repairer_code"].Comparison);
        Assert.Matches(@"^\d+% of claims also say no$", e["police_report"].Comparison);
        Assert.Contains("of claims", e["line"].Comparison);
    }

    [Fact]
    public void Quartiles_follow_hyndman_fan_definition_7()
    {
        // Hyndman & Fan 1996 (The American Statistician 50:361–365), definition 7, R's default:
        // quantile(c(1,2,3,4), c(.25,.5,.75)) = 1.75, 2.5, 3.25.
        double[] sorted = [1, 2, 3, 4];
        Assert.Equal(1.75, FieldStats.Quantile(sorted, 0.25), 1e-12);
        Assert.Equal(2.5, FieldStats.Quantile(sorted, 0.5), 1e-12);
        Assert.Equal(3.25, FieldStats.Quantile(sorted, 0.75), 1e-12);
        Assert.Equal(7.0, FieldStats.Quantile([7.0], 0.75), 1e-12);
    }

    [Theory]
    [InlineData(41.0, "days", "41 days")]
    [InlineData(1.0, "days", "1 day")]
    [InlineData(12500.0, "EUR", "EUR 12,500")]
    [InlineData(420.5, "EUR", "EUR 420.50")]
    [InlineData(0.853, null, "0.85")]
    [InlineData(0.00657, null, "0.0066")]
    public void Values_are_formatted_for_people(double value, string? unit, string text) =>
        Assert.Equal(text, DriverWording.Format(value, unit));
}
