using Triage.Scoring.Tests.Support;
using Xunit.Abstractions;

namespace Triage.Scoring.Tests.Training;

[Collection(DemoModelCollection.Name)]
public class DemoModelTests(DemoModel demo, ITestOutputHelper output)
{
    // Mechanism id → field, from the planted-mechanism table of docs/demo-scenario.md.
    private static readonly Dictionary<string, string> MechanismField = new()
    {
        ["early_loss"] = "days_policy_start_to_loss",
        ["cover_raised"] = "cover_raised_days_before_loss",
        ["late_report"] = "days_loss_to_report",
        ["theft_no_police"] = "police_report",
        ["repairer_hotspot"] = "repairer_code",
        ["prior_claims"] = "prior_claims_3y",
        ["address_change"] = "address_changed_days_before_loss",
        ["near_limit"] = "amount_to_limit_ratio",
        ["night_loss"] = "loss_hour",
        ["old_vehicle"] = "vehicle_age_years",
    };

    private List<Dictionary<string, string?>> Holdout()
    {
        var last = demo.History.Max(r => DateOnly.Parse(r["report_date"]!));
        var cutoff = last.AddMonths(-6);
        return [.. demo.History.Where(r => DateOnly.Parse(r["report_date"]!) > cutoff)];
    }

    [Fact]
    public void Fast_tree_ranks_the_six_month_holdout_with_roc_auc_of_at_least_0_85()
    {
        var m = demo.Model.Metadata;
        output.WriteLine($"training {demo.TrainingTime.TotalSeconds:F1} s; rows {m.TrainingRows} + holdout {m.HoldoutRows}; " +
            $"ROC AUC {m.Holdout.RocAuc:F4}, PR AUC {m.Holdout.PrAuc:F4}, Brier {m.Holdout.Brier:F4}, log loss {m.Holdout.LogLoss:F4}");
        Assert.Equal(Holdout().Count, m.HoldoutRows);
        Assert.True(m.Holdout.RocAuc >= 0.85, $"holdout ROC AUC {m.Holdout.RocAuc:F4}");
    }

    [Fact]
    public void Planted_mechanisms_are_among_the_top_three_raising_drivers()
    {
        var hits = new Dictionary<string, (int Hit, int All)>();
        foreach (var claim in Holdout().Where(r => r["_planted"] is not null))
        {
            var top = demo.Model.Explain(claim).Drivers.Where(d => d.Contribution > 0).Take(3).Select(d => d.Field).ToHashSet();
            foreach (var id in claim["_planted"]!.Split(';'))
            {
                var (hit, all) = hits.GetValueOrDefault(id);
                hits[id] = (hit + (top.Contains(MechanismField[id]) ? 1 : 0), all + 1);
            }
        }
        foreach (var (id, (hit, all)) in hits.OrderBy(p => p.Key)) output.WriteLine($"{id}: {hit}/{all} = {(double)hit / all:P1}");
        var share = (double)hits.Values.Sum(v => v.Hit) / hits.Values.Sum(v => v.All);
        output.WriteLine($"overall {share:P1}");
        Assert.Equal(MechanismField.Keys.Order(), hits.Keys.Order());
        Assert.True(share >= 0.8, $"planted field in the top three raising drivers for {share:P1} of planted holdout claims");
    }

    [Fact]
    public void No_effect_fields_stay_small()
    {
        var explanations = Holdout().Select(demo.Model.Explain).ToList();
        var meanAbs = demo.Model.Fields.ToDictionary(f => f, f => explanations.Average(e => Math.Abs(e[f].Contribution)));
        var strongest = meanAbs.Values.Max();
        foreach (var (f, v) in meanAbs.OrderByDescending(p => p.Value)) output.WriteLine($"{f}: {v:F4} ({v / strongest:P1})");
        Assert.True(meanAbs["branch_office"] < 0.05 * strongest, $"branch_office {meanAbs["branch_office"] / strongest:P1} of the strongest");
        Assert.True(meanAbs["policy_start_day_of_month"] < 0.05 * strongest, $"policy_start_day_of_month {meanAbs["policy_start_day_of_month"] / strongest:P1} of the strongest");
    }

    [Fact]
    public void Every_demo_claim_adds_up_exactly()
    {
        // Local accuracy of TreeSHAP (Lundberg et al. 2020): base + Σ contributions = log-odds, 1e-9 relative.
        var claims = demo.History.Concat(demo.Open).ToList();
        var worst = new double[claims.Count];
        Parallel.For(0, claims.Count, i =>
        {
            var e = demo.Model.Explain(claims[i]);
            worst[i] = Math.Abs(e.BaseValue + e.Drivers.Sum(d => d.Contribution) - e.LogOdds) / Math.Max(1.0, Math.Abs(e.LogOdds));
        });
        output.WriteLine($"{claims.Count} claims, worst relative gap {worst.Max():E2}");
        Assert.True(worst.Max() <= 1e-9, $"worst relative gap {worst.Max():E2}");
    }
}
