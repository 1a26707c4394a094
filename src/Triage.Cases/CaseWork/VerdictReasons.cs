using Triage.Cases.Domain;

namespace Triage.Cases.CaseWork;

/// <summary>The reasons an investigator can give for each outcome; a verdict's reason must come from its outcome's list.</summary>
public static class VerdictReasons
{
    public static readonly IReadOnlyDictionary<VerdictOutcome, IReadOnlyList<string>> ByOutcome = new Dictionary<VerdictOutcome, IReadOnlyList<string>>
    {
        [VerdictOutcome.ConfirmedFraud] =
        [
            "Loss staged or invented", "Amount exaggerated", "False details given", "Same loss claimed more than once",
            "Damage caused on purpose",
        ],
        [VerdictOutcome.NotFraud] =
        [
            "Facts verified with documents", "Account confirmed by third parties", "Driver has an innocent explanation",
            "Error in the claim data",
        ],
        [VerdictOutcome.Inconclusive] =
        [
            "Evidence insufficient either way", "Claimant stopped responding", "Claim withdrawn before a finding",
        ],
    };

    public static string Label(VerdictOutcome o) => o switch
    {
        VerdictOutcome.ConfirmedFraud => "Confirmed fraud",
        VerdictOutcome.NotFraud => "Not fraud",
        _ => "Inconclusive",
    };

    public static void Require(VerdictOutcome outcome, string reason)
    {
        if (!ByOutcome[outcome].Contains(reason))
            throw new DomainRuleException(
                $"'{reason}' is not a reason for {Label(outcome)}; choose one of: {string.Join(", ", ByOutcome[outcome])}.");
    }
}
