using System.Globalization;
using Triage.Cases.Domain;
using Triage.Scoring.Explaining;

namespace Triage.Cases.Tests.Support;

/// <summary>Test-data builders for claims, cases and users.</summary>
public static class Build
{
    private static int _next;
    public static readonly DateTime Now = TestStore.Today.UtcDateTime;

    public static Claim Claim(string line = "motor", double amount = 4200, string? number = null)
    {
        number ??= $"T-{Interlocked.Increment(ref _next):D6}";
        var values = new Dictionary<string, string?>
        {
            ["claim_number"] = number, ["line"] = line, ["claimed_amount"] = amount.ToString(CultureInfo.InvariantCulture),
            ["report_date"] = "2027-03-10", ["loss_date"] = "2027-03-01",
        };
        return Domain.Claim.Receive(number, line, new DateTime(2027, 3, 10, 0, 0, 0, DateTimeKind.Utc),
            new DateTime(2027, 3, 1, 0, 0, 0, DateTimeKind.Utc), null, amount, values);
    }

    public static Explanation Explanation(double probability) => new(-1.5, Math.Log(probability / (1 - probability)), probability,
    [
        new Driver("claimed_amount", "Amount claimed", "4200 EUR", 0.9, 12, "above typical"),
        new Driver("prior_claims_3y", "Prior claims (3 years)", "3", 0.4, 5, "above typical"),
        new Driver("police_report", "Police report", "yes", -0.3, -4, "supplied"),
    ]);

    public static Case Case(double probability = 0.6, string line = "motor", double amount = 4200) =>
        Domain.Case.Open(Claim(line, amount), Explanation(probability), "v-test", new Dictionary<string, string?> { ["claimed_amount"] = "4200" },
            [new CheckItem("claimed_amount", 1, "Ask for invoices", "Compare invoices.", "test")], Now.AddDays(-2), 10, Actor.System);

    public static TriageUser User(string name, string lines = "motor,home") => new()
    {
        Id = $"id-{name}", UserName = name, Email = $"{name}@example.test", DisplayName = name.ToUpperInvariant(), Lines = lines, DailyCapacity = 5,
    };

    public static Actor As(TriageUser u) => new(u.Id, u.UserName!);
}
