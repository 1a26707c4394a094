using System.Globalization;
using System.Text;
using Triage.Scoring.Schema;

namespace Triage.Bench.Intake;

/// <summary>Seeded valid claims in the demo schema, written as a CSV file or produced as value maps.</summary>
internal static class BenchClaims
{
    private static readonly string[] Lines = ["motor", "home", "travel"];

    public static IEnumerable<Dictionary<string, string?>> Generate(ClaimSchema schema, int count, int seed = 3)
    {
        var r = new Random(seed);
        var branches = schema.Field("branch_office").Categories!;
        var bands = schema.Field("claimant_age_band").Categories!;
        var inv = CultureInfo.InvariantCulture;
        for (var i = 1; i <= count; i++)
        {
            var line = Lines[r.Next(Lines.Length)];
            var report = new DateOnly(2026, 11, 20).AddDays(r.Next(10));
            var loss = report.AddDays(-(r.NextDouble() < 0.15 ? r.Next(20, 90) : r.Next(0, 6)));
            var limit = line == "home" ? 50_000 : line == "motor" ? 15_000 : 5_000;
            yield return new Dictionary<string, string?>
            {
                ["claim_number"] = $"BENCH-{i:D7}",
                ["policy_number"] = $"BP-{r.Next(10_000_000):D7}",
                ["claimant_name"] = $"Bench Claimant {i}",
                ["line"] = line,
                ["loss_cause"] = line switch { "motor" => r.Next(2) == 0 ? "collision" : "theft", "home" => r.Next(2) == 0 ? "water" : "burglary", _ => "baggage_loss" },
                ["policy_start_date"] = loss.AddDays(-r.Next(5, 2000)).ToString("yyyy-MM-dd", inv),
                ["loss_date"] = loss.ToString("yyyy-MM-dd", inv),
                ["report_date"] = report.ToString("yyyy-MM-dd", inv),
                ["loss_hour"] = r.Next(5) == 0 ? null : r.Next(24).ToString(inv),
                ["claimed_amount"] = Math.Round(100 + r.NextDouble() * r.NextDouble() * limit, 2).ToString(inv),
                ["policy_limit"] = limit.ToString(inv),
                ["cover_raised_days_before_loss"] = r.Next(8) == 0 ? r.Next(1, 200).ToString(inv) : null,
                ["address_changed_days_before_loss"] = r.Next(10) == 0 ? r.Next(1, 400).ToString(inv) : null,
                ["prior_claims_3y"] = r.Next(4).ToString(inv),
                ["police_report"] = line == "motor" ? (r.Next(2) == 0 ? "yes" : "no") : null,
                ["repairer_code"] = line == "travel" ? null : $"RP-{r.Next(1, 41):D2}",
                ["vehicle_age_years"] = line == "motor" ? r.Next(20).ToString(inv) : null,
                ["branch_office"] = branches[r.Next(branches.Count)],
                ["claimant_age_band"] = bands[r.Next(bands.Count)],
            };
        }
    }

    public static void WriteCsv(string path, ClaimSchema schema, int count)
    {
        var header = schema.Fields.Select(f => f.Name).ToArray();
        using var writer = new StreamWriter(path, false, new UTF8Encoding(false), 1 << 16);
        writer.Write(string.Join(',', header) + "\n");
        // No generated value holds a comma or a quote, so cells need no quoting.
        foreach (var claim in Generate(schema, count))
            writer.Write(string.Join(',', header.Select(h => claim[h] ?? "")) + "\n");
    }
}
