using Triage.Scoring.Features;
using Triage.Scoring.Tests.Support;
using Triage.Scoring.Training;
using Xunit.Abstractions;

namespace Triage.Scoring.Tests.Metrics;

/// <summary>
/// Inverse-propensity weighting (Horvitz & Thompson 1952): a labelled row that was sampled with
/// probability π stands for 1/π claims. Here the old model's queue never looks at one fraud pattern;
/// only the random audit sample labels claims below the queue, and weighting those rows by 1/π is what
/// lets the retrained model see how common the pattern is.
/// </summary>
public class AuditSampleWeightingTests(ITestOutputHelper output)
{
    private const double QueueShare = 0.12, AuditShare = 0.05;
    private const string HiddenBranch = "Corrow Bay";

    [Fact]
    public void Weighted_audit_sample_ranks_the_hidden_pattern_higher_than_the_queue_alone()
    {
        var population = Population(30_000, seed: 21);
        var cutoff = Quantile(population.Select(c => c.OldLogit), 1 - QueueShare);
        var rng = new Random(5);
        var queued = population.Where(c => c.OldLogit >= cutoff).Select(c => new LabelledClaim(c.Values, c.Fraud)).ToList();
        var audit = population.Where(c => c.OldLogit < cutoff && rng.NextDouble() < AuditShare).ToList();
        Assert.Contains(audit, c => c.Hidden && c.Fraud);

        var trainer = new ModelTrainer(Microsoft.Extensions.Options.Options.Create(TrainedModels.Options));
        var schema = SyntheticClaims.Schema;
        var queueOnly = trainer.Train(schema, queued, new("queue-only"));
        var unweighted = trainer.Train(schema, [.. queued, .. audit.Select(c => new LabelledClaim(c.Values, c.Fraud))], new("audit-unweighted"));
        var weighted = trainer.Train(schema, [.. queued, .. audit.Select(c => new LabelledClaim(c.Values, c.Fraud, 1 / AuditShare))], new("audit-weighted"));

        // Effect measured: how far each model raises the pattern against otherwise identical claims. For
        // fresh small claims (amount under 20% of the limit), the mean log-odds with the branch set to the
        // hidden one minus the mean with it set to each other branch. The generator's true lift is 2.5.
        var small = Population(3_000, seed: 99).Where(g => Share(g.Values) < 0.2).Select(g => g.Values).ToList();
        var others = schema.Field("branch_office").Categories!.Where(b => b != HiddenBranch).ToList();
        double Lift(Triage.Scoring.Models.ScoringModel m) => small.Average(v =>
            Logit(m.Probability(With(v, HiddenBranch))) - others.Average(o => Logit(m.Probability(With(v, o)))));
        var (a, b, c) = (Lift(queueOnly), Lift(unweighted), Lift(weighted));
        output.WriteLine($"log-odds lift of the hidden pattern (true 2.5): queue only {a:0.00}, audit unweighted {b:0.00}, audit weighted 1/π {c:0.00}");
        Assert.True(c > a + 0.5, $"weighted lift {c:0.00} should clearly exceed the queue alone ({a:0.00})");
        Assert.True(c > b, $"weighted lift {c:0.00} should exceed the same rows unweighted ({b:0.00})");
    }

    private static double Share(IReadOnlyDictionary<string, string?> v) =>
        ClaimValues.Number(v, "claimed_amount") / ClaimValues.Number(v, "policy_limit");

    private static double Logit(double p) => Math.Log(p / (1 - p));

    private static Dictionary<string, string?> With(IReadOnlyDictionary<string, string?> v, string branch) =>
        new(v) { ["branch_office"] = branch };

    private sealed record Generated(IReadOnlyDictionary<string, string?> Values, double OldLogit, bool Hidden, bool Fraud);

    /// <summary>
    /// The synthetic claims' known mechanism is what the old model knows (its logit is the old score). The
    /// hidden pattern — small claims from one branch office — adds 2.5 to the log-odds of fraud.
    /// </summary>
    private static List<Generated> Population(int n, int seed)
    {
        var rng = new Random(seed + 1000);
        return [.. SyntheticClaims.Generate(n, seed).Select(r =>
        {
            var v = new Dictionary<string, string?>(r.Values);
            var share = Share(v);
            var delay = ClaimValues.Date(v, "report_date")!.Value.DayNumber - ClaimValues.Date(v, "loss_date")!.Value.DayNumber;
            var raised = ClaimValues.Number(v, "cover_raised_days_before_loss");
            var old = -3.2 + (delay > 14 ? 1.6 : 0) + (raised < 45 ? 1.8 : 0) + (v["repairer_code"] == "RP-07" ? 1.5 : 0)
                + (v["police_report"] == "no" ? 1.2 : 0) + 1.5 * share;
            var hidden = v["branch_office"] == HiddenBranch && share < 0.2;
            var fraud = rng.NextDouble() < 1 / (1 + Math.Exp(-(old + (hidden ? 2.5 : 0))));
            return new Generated(v, old, hidden, fraud);
        })];
    }

    private static double Quantile(IEnumerable<double> values, double q)
    {
        var sorted = values.Order().ToArray();
        return sorted[(int)Math.Floor(q * (sorted.Length - 1))];
    }
}
