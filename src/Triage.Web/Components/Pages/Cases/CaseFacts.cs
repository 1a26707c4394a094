using System.Globalization;
using Triage.Cases.CaseFile;
using Triage.Cases.Domain;

namespace Triage.Web.Components.Pages.Cases;

public sealed record FactGroup(string Title, IReadOnlyList<(string Name, string Value)> Facts);

/// <summary>The claim facts the case page and the case report show, grouped the same way in both.</summary>
public static class CaseFacts
{
    public const string Caution = "A risk score ranks claims for review; it is not evidence. Decisions must rest on investigated facts and follow local rules on fair claims handling and data protection.";

    public static IReadOnlyList<FactGroup> Groups(CaseFileView f)
    {
        var values = f.Claim.FieldValues();
        string Raw(string key) => values.TryGetValue(key, out var v) && !string.IsNullOrWhiteSpace(v) ? v.Replace('_', ' ') : "—";
        var c = f.Case;
        return
        [
            new("Claim", [("Claim number", c.ClaimNumber), ("Line of business", f.Claim.Line), ("Cause of loss", Raw("loss_cause")),
                ("Amount claimed", Money(f.Claim.ClaimedAmount)), ("Policy limit", Amount(Raw("policy_limit")))]),
            new("Dates", [("Policy start", Date(f.Claim.PolicyStartDate)), ("Date of loss", Date(f.Claim.LossDate)),
                ("Date reported", Date(f.Claim.ReportDate))]),
            new("Handling", [("Status", Status(c.Status)), ("Assignee", c.AssigneeName ?? "Unassigned"), ("Case opened", Date(c.OpenedAt)),
                ("Due", Date(c.DueDate))]),
        ];
    }

    public static string Rank(CaseFileView f) =>
        f.Rank is { } r ? $"{r.Rank} of {r.OpenCases} open cases" : "not in the queue (closed)";

    private static string Amount(string raw) =>
        double.TryParse(raw, NumberStyles.Float, CultureInfo.InvariantCulture, out var a) ? Money(a) : raw;

    public static string Money(double amount) => amount.ToString("N2", CultureInfo.InvariantCulture);

    public static string Date(DateTime? d) => d?.ToString("d MMM yyyy", CultureInfo.InvariantCulture) ?? "—";

    public static string When(DateTime d) => d.ToString("d MMM yyyy HH:mm 'UTC'", CultureInfo.InvariantCulture);

    public static string Points(double p) => p.ToString("+0.0;-0.0;0.0", CultureInfo.InvariantCulture) + " pts";

    public static string Status(CaseStatus s) => s switch
    {
        CaseStatus.New => "New",
        CaseStatus.Assigned => "Assigned",
        CaseStatus.InReview => "In review",
        _ => "Closed",
    };
}
