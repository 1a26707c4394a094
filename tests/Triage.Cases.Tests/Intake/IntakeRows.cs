using System.Globalization;
using System.Text;
using Triage.Cases.Hosting;
using Triage.Scoring.Schema;

namespace Triage.Cases.Tests.Intake;

/// <summary>Valid claims in the demo schema (seeded), as CSV or JSON text, for intake tests to break one cell at a time.</summary>
public static class IntakeRows
{
    public static readonly ClaimSchema Schema = ClaimSchema.Load(Path.Combine(TriageHome.Locate(), "seed-cases", "schema.json"));
    public static string[] Header => [.. Schema.Fields.Select(f => f.Name)];

    public static Dictionary<string, string?> Valid(int i, string prefix = "N")
    {
        var r = new Random(1000 + i);
        var line = TinySeedLines[i % TinySeedLines.Length];
        var report = new DateOnly(2027, 3, 1).AddDays(r.Next(10));
        var loss = report.AddDays(-r.Next(1, 20));
        var inv = CultureInfo.InvariantCulture;
        return new Dictionary<string, string?>
        {
            ["claim_number"] = $"{prefix}-{i:D6}",
            ["policy_number"] = $"P-{r.Next(100000):D6}",
            ["claimant_name"] = $"Intake Person {i}",
            ["line"] = line,
            ["loss_cause"] = line switch { "motor" => "collision", "home" => "water", _ => "baggage_loss" },
            ["policy_start_date"] = loss.AddDays(-r.Next(10, 900)).ToString("yyyy-MM-dd", inv),
            ["loss_date"] = loss.ToString("yyyy-MM-dd", inv),
            ["report_date"] = report.ToString("yyyy-MM-dd", inv),
            ["loss_hour"] = r.Next(24).ToString(inv),
            ["claimed_amount"] = Math.Round(200 + r.NextDouble() * 15_000, 2).ToString(inv),
            ["policy_limit"] = "25000",
            ["cover_raised_days_before_loss"] = "",
            ["address_changed_days_before_loss"] = "",
            ["prior_claims_3y"] = r.Next(5).ToString(inv),
            ["police_report"] = line == "motor" ? "yes" : "",
            ["repairer_code"] = line == "travel" ? "" : $"RP-{r.Next(1, 41):D2}",
            ["vehicle_age_years"] = line == "motor" ? r.Next(15).ToString(inv) : "",
            ["branch_office"] = "Dunmere",
            ["claimant_age_band"] = "36-50",
        };
    }

    private static readonly string[] TinySeedLines = ["motor", "home", "travel"];

    public static List<Dictionary<string, string?>> Many(int count, string prefix = "N") => [.. Enumerable.Range(1, count).Select(i => Valid(i, prefix))];

    /// <summary>Plain CSV with a header; no cell here needs quoting.</summary>
    public static string Csv(IEnumerable<IReadOnlyDictionary<string, string?>> rows, char delimiter = ',', string[]? header = null)
    {
        header ??= Header;
        var sb = new StringBuilder(string.Join(delimiter, header)).Append('\n');
        foreach (var row in rows) sb.Append(string.Join(delimiter, header.Select(h => row.GetValueOrDefault(h) ?? ""))).Append('\n');
        return sb.ToString();
    }

    public static string Json(IEnumerable<IReadOnlyDictionary<string, string?>> rows) =>
        System.Text.Json.JsonSerializer.Serialize(rows.Select(r => r.Where(kv => !string.IsNullOrEmpty(kv.Value)).ToDictionary()));

    /// <summary>Sets one cell of a plain CSV (no quoted delimiters) by data row and column name.</summary>
    public static string Edit(string csv, int row, string column, string value, char delimiter = ',')
    {
        var lines = csv.Split('\n');
        var at = Array.IndexOf(lines[0].Split(delimiter), column);
        var cells = lines[row].Split(delimiter);
        cells[at] = value;
        lines[row] = string.Join(delimiter, cells);
        return string.Join('\n', lines);
    }

    public static byte[] Utf8(string s) => Encoding.UTF8.GetBytes(s);
}
