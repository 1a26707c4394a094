using System.Globalization;
using CsvHelper;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Cli.Tests.Explain;

/// <summary>Seeded claims in the demo schema where late reporting and repairer RP-07 raise the fraud odds.</summary>
internal static class SmallClaims
{
    public static List<LabelledClaim> Generate(ClaimSchema schema, int count, int seed)
    {
        var rng = new Random(seed);
        var rows = new List<LabelledClaim>();
        for (var i = 0; i < count; i++)
        {
            var report = new DateOnly(2025, 1, 1).AddDays(rng.Next(0, 600));
            var delay = rng.NextDouble() < 0.2 ? rng.Next(20, 80) : rng.Next(0, 5);
            var loss = report.AddDays(-delay);
            var repairer = rng.NextDouble() < 0.3 ? null : $"RP-{rng.Next(1, 11):00}";
            var logit = -2.5 + (delay > 14 ? 2.0 : 0) + (repairer == "RP-07" ? 2.0 : 0);
            var values = new Dictionary<string, string?>
            {
                ["claim_number"] = $"T-{i:0000}",
                ["line"] = "motor",
                ["loss_cause"] = rng.NextDouble() < 0.5 ? "collision" : "theft",
                ["policy_start_date"] = Date(loss.AddDays(-rng.Next(10, 900))),
                ["loss_date"] = Date(loss),
                ["report_date"] = Date(report),
                ["loss_hour"] = rng.NextDouble() < 0.2 ? null : rng.Next(0, 24).ToString(CultureInfo.InvariantCulture),
                ["claimed_amount"] = (rng.Next(100, 9000) + 0.5).ToString(CultureInfo.InvariantCulture),
                ["policy_limit"] = "10000",
                ["cover_raised_days_before_loss"] = null,
                ["address_changed_days_before_loss"] = null,
                ["prior_claims_3y"] = rng.Next(0, 3).ToString(CultureInfo.InvariantCulture),
                ["police_report"] = rng.NextDouble() < 0.5 ? "yes" : null,
                ["repairer_code"] = repairer,
                ["vehicle_age_years"] = rng.Next(0, 15).ToString(CultureInfo.InvariantCulture),
                ["branch_office"] = schema.Field("branch_office").Categories![rng.Next(6)],
            };
            rows.Add(new LabelledClaim(values, rng.NextDouble() < 1 / (1 + Math.Exp(-logit))));
        }
        return rows;
    }

    public static void WriteCsv(string path, ClaimSchema schema, IEnumerable<IReadOnlyDictionary<string, string?>> claims)
    {
        var header = schema.Fields.Select(f => f.Name).ToArray();
        using var writer = new StreamWriter(path);
        using var csv = CsvWriter.Create(writer, CsvWriterOptions.Default with { NewLine = "\n" }, leaveOpen: true);
        csv.WriteHeader(header);
        foreach (var c in claims) csv.WriteRecord([.. header.Select(h => c.GetValueOrDefault(h) ?? "")]);
    }

    private static string Date(DateOnly d) => d.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
}
