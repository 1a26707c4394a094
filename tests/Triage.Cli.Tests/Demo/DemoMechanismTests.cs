using System.Globalization;
using System.Text.Json;
using Triage.Cli.Demo;

namespace Triage.Cli.Tests.Demo;

/// <summary>The planted truth read back from the written files: triggers, firing rates, effect sizes, and the fields that must carry none.</summary>
public sealed class DemoMechanismTests
{
    private static readonly List<Dictionary<string, string>> History = DemoRun.ReadCsv(Path.Combine(DemoRun.Default, DemoWriter.HistoryFile));
    private static readonly List<Dictionary<string, string>> Open = DemoRun.ReadCsv(Path.Combine(DemoRun.Default, DemoWriter.OpenFile));

    private static bool IsFraud(Dictionary<string, string> row) => row["outcome"] == "confirmed_fraud";

    private static string[] Planted(Dictionary<string, string> row) => row["_planted"].Split(';', StringSplitOptions.RemoveEmptyEntries);

    [Fact]
    public void Fraud_prevalence_is_between_four_and_eight_percent_and_matches_scenario_json()
    {
        var rate = (double)History.Count(IsFraud) / History.Count;
        Assert.InRange(rate, 0.04, 0.08);
        using var scenario = JsonDocument.Parse(File.ReadAllText(Path.Combine(DemoRun.Default, DemoWriter.ScenarioFile)));
        Assert.Equal(Math.Round(rate, 4), scenario.RootElement.GetProperty("fraudRate").GetDouble());
        Assert.Equal(History.Count, scenario.RootElement.GetProperty("historyRows").GetInt32());
        Assert.Equal(Open.Count, scenario.RootElement.GetProperty("openRows").GetInt32());
        Assert.Equal("2026-11-30", scenario.RootElement.GetProperty("asOf").GetString());
    }

    /// <summary>Re-derives each trigger from the raw CSV text, independently of the generator's own predicates.</summary>
    [Fact]
    public void Planted_column_lists_exactly_the_triggers_that_hold_on_the_written_values()
    {
        foreach (var row in History.Concat(Open))
        {
            var expected = new List<string>();
            if (Days(row["policy_start_date"], row["loss_date"]) < 30) expected.Add("early_loss");
            if (Int(row["cover_raised_days_before_loss"]) < 30) expected.Add("cover_raised");
            if (Days(row["loss_date"], row["report_date"]) > 30) expected.Add("late_report");
            if (row["loss_cause"] is "theft" or "burglary" && row["police_report"] == "no") expected.Add("theft_no_police");
            if (row["repairer_code"] is "RP-07" or "RP-23") expected.Add("repairer_hotspot");
            if (Int(row["prior_claims_3y"]) >= 3) expected.Add("prior_claims");
            if (Int(row["address_changed_days_before_loss"]) < 60) expected.Add("address_change");
            if (Num(row["claimed_amount"]) / Num(row["policy_limit"]) > 0.9) expected.Add("near_limit");
            if (Int(row["loss_hour"]) is >= 0 and <= 4) expected.Add("night_loss");
            if (Int(row["vehicle_age_years"]) >= 15) expected.Add("old_vehicle");
            Assert.Equal(expected, Planted(row));
        }
    }

    [Fact]
    public void Each_mechanism_fires_hundreds_of_times_in_history_and_for_a_minority_of_claims()
    {
        Assert.True(Mechanisms.All.Count >= 8);
        foreach (var m in Mechanisms.All)
        {
            var fired = History.Count(r => Planted(r).Contains(m.Id));
            Assert.True(fired >= 300, $"{m.Id} fired {fired} times");
            Assert.True(fired < 0.08 * History.Count, $"{m.Id} fired for {fired} of {History.Count}");
            Assert.True(Open.Count(r => Planted(r).Contains(m.Id)) >= 5, $"{m.Id} barely fires in open claims");
        }
    }

    /// <summary>
    /// Where exactly one mechanism fired, the observed fraud rate must match the documented model
    /// p = E[σ(base + effect + ε)], ε ~ N(0, sd²) (logistic model with Gaussian noise; the expectation is a
    /// numerical integral). Tolerance: 4 binomial standard errors, sqrt(p(1−p)/n).
    /// </summary>
    [Fact]
    public void Observed_fraud_rates_match_the_documented_log_odds()
    {
        var cases = Mechanisms.All.Select(m => (Label: m.Id, Effect: m.Effect, Rows: History.Where(r => Planted(r) is [var only] && only == m.Id).ToList()))
            .Append((Label: "none", Effect: 0.0, Rows: History.Where(r => Planted(r).Length == 0).ToList()));
        foreach (var (label, effect, rows) in cases)
        {
            var p = ExpectedRate(Mechanisms.BaseLogOdds + effect, Mechanisms.NoiseSd);
            var observed = (double)rows.Count(IsFraud) / rows.Count;
            var tolerance = 4 * Math.Sqrt(p * (1 - p) / rows.Count);
            Assert.True(Math.Abs(observed - p) <= tolerance, $"{label}: observed {observed:F4} over {rows.Count}, expected {p:F4} ± {tolerance:F4}");
        }
    }

    // Chi-square critical values at α = 0.001: NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.4
    // (df 2: 13.816, df 5: 20.515), quoted from memory.
    [Theory]
    [InlineData("branch_office", 20.515)]
    [InlineData("policy_start_day_of_month", 13.816)]
    [InlineData("claimant_age_band", 20.515)]
    public void No_effect_and_protected_fields_are_independent_of_fraud(string field, double critical)
    {
        Func<Dictionary<string, string>, string> level = field == "policy_start_day_of_month"
            ? r => (int.Parse(r["policy_start_date"][8..], CultureInfo.InvariantCulture) - 1) switch { < 10 => "1-10", < 20 => "11-20", _ => "21-31" }
            : r => r[field];
        var table = History.GroupBy(level).Select(g => (Total: g.Count(), Fraud: g.Count(IsFraud))).ToList();
        Assert.Equal(critical == 13.816 ? 3 : 6, table.Count);
        var overall = (double)History.Count(IsFraud) / History.Count;
        var chi2 = table.Sum(c =>
            Math.Pow(c.Fraud - c.Total * overall, 2) / (c.Total * overall) +
            Math.Pow(c.Total - c.Fraud - c.Total * (1 - overall), 2) / (c.Total * (1 - overall)));
        Assert.True(chi2 < critical, $"{field}: chi-square {chi2:F2} ≥ {critical}");
    }

    [Fact]
    public void Fraud_rate_per_branch_office_is_within_two_points_of_the_overall_rate()
    {
        // About 4,000 claims a branch: one standard error is ~0.4 points, so 2 points is ~5 standard errors.
        var overall = (double)History.Count(IsFraud) / History.Count;
        foreach (var branch in History.GroupBy(r => r["branch_office"]))
            Assert.InRange((double)branch.Count(IsFraud) / branch.Count(), overall - 0.02, overall + 0.02);
    }

    private static double ExpectedRate(double logOdds, double sd)
    {
        // Trapezoid rule over ±8 sd; the integrand is smooth, so 4,001 points are far more than enough.
        const int steps = 4000;
        double sum = 0, h = 16.0 / steps;
        for (var i = 0; i <= steps; i++)
        {
            var z = -8 + i * h;
            var weight = (i == 0 || i == steps ? 0.5 : 1.0) * Math.Exp(-z * z / 2) / Math.Sqrt(2 * Math.PI);
            sum += weight / (1 + Math.Exp(-(logOdds + sd * z)));
        }
        return sum * h;
    }

    private static int Days(string from, string to) =>
        DateOnly.ParseExact(to, "yyyy-MM-dd", CultureInfo.InvariantCulture).DayNumber - DateOnly.ParseExact(from, "yyyy-MM-dd", CultureInfo.InvariantCulture).DayNumber;

    private static int? Int(string s) => s == "" ? null : int.Parse(s, CultureInfo.InvariantCulture);

    private static double Num(string s) => double.Parse(s, CultureInfo.InvariantCulture);
}
