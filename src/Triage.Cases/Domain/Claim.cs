using System.Text.Json;

namespace Triage.Cases.Domain;

public enum ClaimState { Open, Closed }

/// <summary>
/// A claim as the insurer sent it. The raw field values (invariant strings keyed by schema field name)
/// are kept as JSON so a model can be retrained on exactly what was received; the columns beside them
/// are the few every query needs.
/// </summary>
public sealed class Claim
{
    private Claim() { }

    public int Id { get; private set; }
    public string ClaimNumber { get; private set; } = "";
    public string Line { get; private set; } = "";
    public DateTime ReportDate { get; private set; }
    public DateTime? LossDate { get; private set; }
    public DateTime? PolicyStartDate { get; private set; }
    /// <summary>Stored as double: SQLite cannot sort or sum decimals in EF Core.</summary>
    public double ClaimedAmount { get; private set; }
    public string FieldValuesJson { get; private set; } = "{}";
    public ClaimState State { get; private set; }
    public DateTime? ClosedDate { get; private set; }
    /// <summary>The settled outcome: from the claims history on import, or from the current verdict.</summary>
    public VerdictOutcome? Outcome { get; private set; }

    public static Claim Receive(string claimNumber, string line, DateTime reportDate, DateTime? lossDate,
        DateTime? policyStartDate, double claimedAmount, IReadOnlyDictionary<string, string?> values)
    {
        if (string.IsNullOrWhiteSpace(claimNumber)) throw new DomainRuleException("A claim needs a claim number.");
        if (string.IsNullOrWhiteSpace(line)) throw new DomainRuleException($"Claim {claimNumber} has no line of business.");
        if (claimedAmount < 0) throw new DomainRuleException($"Claim {claimNumber} claims a negative amount ({claimedAmount}).");
        if (lossDate > reportDate) throw new DomainRuleException($"Claim {claimNumber} was reported before the loss happened.");
        return new Claim
        {
            ClaimNumber = claimNumber,
            Line = line,
            ReportDate = Utc(reportDate),
            LossDate = lossDate is { } l ? Utc(l) : null,
            PolicyStartDate = policyStartDate is { } p ? Utc(p) : null,
            ClaimedAmount = claimedAmount,
            FieldValuesJson = JsonSerializer.Serialize(values),
            State = ClaimState.Open,
        };
    }

    public IReadOnlyDictionary<string, string?> FieldValues() =>
        JsonSerializer.Deserialize<Dictionary<string, string?>>(FieldValuesJson) ?? [];

    /// <summary>Records a settled outcome (history import or a verdict) and closes the claim for triage.</summary>
    public void Settle(VerdictOutcome outcome, DateTime closedDate)
    {
        Outcome = outcome;
        ClosedDate = Utc(closedDate);
        State = ClaimState.Closed;
    }

    internal static DateTime Utc(DateTime value) => value.Kind switch
    {
        DateTimeKind.Utc => value,
        DateTimeKind.Unspecified => DateTime.SpecifyKind(value, DateTimeKind.Utc),
        _ => value.ToUniversalTime(),
    };
}
