using System.Globalization;
using System.Text;
using System.Text.Json;
using Triage.Cases.Hosting;

namespace Triage.Cases.Tests.Support;

/// <summary>
/// Writes a small generated scenario (seeded, so every run is the same) in the seed-folder layout:
/// the real schema, a history where fraud follows amount and prior claims, open claims, a team and a playbook.
/// </summary>
public static class TinySeed
{
    public static readonly DateOnly AsOf = new(2026, 11, 30);
    public const string Password = "Tiny-seed-pass-1";
    public static readonly string[] Lines = ["motor", "home", "travel"];

    public static string Write(string folder, int historyRows = 600, int openRows = 80, int seed = 11)
    {
        Directory.CreateDirectory(folder);
        File.Copy(Path.Combine(TriageHome.Locate(), "seed-cases", "schema.json"), Path.Combine(folder, "schema.json"), overwrite: true);
        File.WriteAllText(Path.Combine(folder, "scenario.json"), JsonSerializer.Serialize(new
        {
            insurer = "Larchmere Mutual (test)", seed, asOf = AsOf.ToString("yyyy-MM-dd"), historyRows, openRows, fraudRate = 0.2,
        }));
        var random = new Random(seed);
        File.WriteAllText(Path.Combine(folder, "history.csv"), Csv(random, "H", historyRows, history: true));
        File.WriteAllText(Path.Combine(folder, "open-claims.csv"), Csv(random, "O", openRows, history: false));
        File.WriteAllText(Path.Combine(folder, "team.json"), Team);
        File.WriteAllText(Path.Combine(folder, "playbook.json"), Playbook);
        return folder;
    }

    private static readonly string[] Columns =
    [
        "claim_number", "policy_number", "claimant_name", "line", "loss_cause", "policy_start_date", "loss_date", "report_date",
        "loss_hour", "claimed_amount", "policy_limit", "cover_raised_days_before_loss", "address_changed_days_before_loss",
        "prior_claims_3y", "police_report", "repairer_code", "vehicle_age_years", "branch_office", "claimant_age_band",
    ];

    private static string Csv(Random r, string prefix, int rows, bool history)
    {
        var sb = new StringBuilder(string.Join(',', Columns) + (history ? ",outcome,closed_date" : "") + ",_planted\n");
        var inv = CultureInfo.InvariantCulture;
        for (var i = 0; i < rows; i++)
        {
            var line = Lines[r.Next(Lines.Length)];
            var cause = line switch { "motor" => "collision", "home" => "water", _ => "baggage_loss" };
            var report = AsOf.AddDays(history ? -60 - r.Next(500) : -r.Next(20));
            var loss = report.AddDays(-r.Next(1, 30));
            var start = loss.AddDays(-r.Next(10, 900));
            var amount = Math.Round(200 + r.NextDouble() * r.NextDouble() * 20_000, 2);
            var prior = r.Next(0, 5);
            var fraud = r.NextDouble() < 1 / (1 + Math.Exp(-(-3.2 + amount / 5_000 + 0.5 * prior)));
            string[] values =
            [
                $"{prefix}-{i:D5}", $"P-{r.Next(100000):D6}", $"Test Person {i}", line, cause, D(start), D(loss), D(report),
                r.Next(24).ToString(inv), amount.ToString(inv), "25000", r.Next(3) == 0 ? r.Next(1, 60).ToString(inv) : "",
                "", prior.ToString(inv), line == "motor" ? (r.Next(2) == 0 ? "yes" : "no") : "",
                line == "travel" ? "" : $"RP-{r.Next(1, 41):D2}", line == "motor" ? r.Next(0, 15).ToString(inv) : "",
                "Dunmere", "36-50",
            ];
            sb.Append(string.Join(',', values));
            if (history) sb.Append(',').Append(fraud ? "confirmed_fraud" : "not_fraud").Append(',').Append(D(report.AddDays(30)));
            sb.Append(',').Append(fraud ? "1" : "0").Append('\n');
        }
        return sb.ToString();
    }

    private static string D(DateOnly d) => d.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    private const string Team = """
        {"people":[
          {"userName":"ines.varga","displayName":"Ines Varga","email":"ines.varga@example.test","roles":["Investigator"],"lines":["motor","home"],"dailyCapacity":5},
          {"userName":"tomas.reed","displayName":"Tomas Reed","email":"tomas.reed@example.test","roles":["Investigator"],"lines":["travel"],"dailyCapacity":3},
          {"userName":"mara.holt","displayName":"Mara Holt","email":"mara.holt@example.test","roles":["TeamLead","Investigator"],"lines":["motor","home","travel"],"dailyCapacity":2},
          {"userName":"olu.berg","displayName":"Olu Berg","email":"olu.berg@example.test","roles":["Analyst","Admin"],"lines":[],"dailyCapacity":0}
        ]}
        """;

    private const string Playbook = """
        {"rules":[
          {"field":"claimed_amount","direction":"raises","condition":{"op":"gte","value":5000},
           "checks":[{"title":"Ask for the original invoices","detail":"Compare invoices with the amount claimed."}],"basis":"test rule"},
          {"field":"prior_claims_3y","direction":"raises",
           "checks":[{"title":"Review earlier claims","detail":"Look for the same items claimed twice."}],"basis":"test rule"},
          {"field":"claimed_amount","direction":"lowers",
           "checks":[{"title":"Confirm the small amount","detail":"Never shown as a check item: lowers."}],"basis":"test rule"}
        ]}
        """;
}
