using System.Globalization;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Support;

/// <summary>
/// Seeded claims in the demo schema with a known fraud mechanism (late reporting, recently raised
/// cover, repairer RP-07, no police report, high amount share), so tests do not depend on the demo data.
/// </summary>
public static class SyntheticClaims
{
    public static ClaimSchema Schema { get; } = ClaimSchema.Load(Repo.SeedCases("schema.json"));

    public static List<LabelledClaim> Generate(int count, int seed)
    {
        var rng = new Random(seed);
        var first = new DateOnly(2024, 1, 1);
        var rows = new List<LabelledClaim>(count);
        var schema = Schema;
        for (var i = 0; i < count; i++)
        {
            var line = Pick(rng, "motor", "home", "travel");
            var cause = line switch
            {
                "motor" => Pick(rng, "collision", "theft", "vandalism", "windscreen"),
                "home" => Pick(rng, "fire", "water", "storm", "burglary", "accidental_damage"),
                _ => Pick(rng, "baggage_loss", "medical", "cancellation"),
            };
            var report = first.AddDays(rng.Next(0, 730));
            var late = rng.NextDouble() < 0.15;
            var delay = late ? rng.Next(15, 90) : rng.Next(0, 6);
            var loss = report.AddDays(-delay);
            var start = loss.AddDays(-rng.Next(5, 2000));
            var limit = Pick(rng, 5000.0, 10000.0, 25000.0, 50000.0);
            var amount = Math.Round(limit * Math.Pow(rng.NextDouble(), 2.5), 2);
            var coverRaised = rng.NextDouble() < 0.12 ? rng.Next(0, 400) : (int?)null;
            var police = cause is "theft" or "burglary" or "vandalism" ? (rng.NextDouble() < 0.8 ? "yes" : "no") : null;
            var repairer = line == "travel" || rng.NextDouble() < 0.3 ? null : $"RP-{rng.Next(1, 41):00}";
            var logit = -3.2
                + (delay > 14 ? 1.6 : 0)
                + (coverRaised is < 45 ? 1.8 : 0)
                + (repairer == "RP-07" ? 1.5 : 0)
                + (police == "no" ? 1.2 : 0)
                + 1.5 * (amount / limit);
            var fraud = rng.NextDouble() < 1 / (1 + Math.Exp(-logit));
            var values = new Dictionary<string, string?>
            {
                ["claim_number"] = $"C{i:000000}",
                ["policy_number"] = $"P{rng.Next(100000):000000}",
                ["claimant_name"] = $"Person {i}",
                ["line"] = line,
                ["loss_cause"] = cause,
                ["policy_start_date"] = Date(start),
                ["loss_date"] = Date(loss),
                ["report_date"] = Date(report),
                ["loss_hour"] = rng.NextDouble() < 0.2 ? "" : rng.Next(0, 24).ToString(CultureInfo.InvariantCulture),
                ["claimed_amount"] = amount.ToString(CultureInfo.InvariantCulture),
                ["policy_limit"] = limit.ToString(CultureInfo.InvariantCulture),
                ["cover_raised_days_before_loss"] = coverRaised?.ToString(CultureInfo.InvariantCulture),
                ["address_changed_days_before_loss"] = rng.NextDouble() < 0.9 ? null : rng.Next(0, 1000).ToString(CultureInfo.InvariantCulture),
                ["prior_claims_3y"] = rng.Next(0, 4).ToString(CultureInfo.InvariantCulture),
                ["police_report"] = police,
                ["repairer_code"] = repairer,
                ["vehicle_age_years"] = line == "motor" ? rng.Next(0, 20).ToString(CultureInfo.InvariantCulture) : null,
                ["branch_office"] = schema.Field("branch_office").Categories![rng.Next(6)],
                ["claimant_age_band"] = schema.Field("claimant_age_band").Categories![rng.Next(5)],
            };
            rows.Add(new LabelledClaim(values, fraud));
        }
        return rows;
    }

    private static T Pick<T>(Random rng, params T[] items) => items[rng.Next(items.Length)];

    private static string Date(DateOnly d) => d.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
}
