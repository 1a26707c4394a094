namespace Triage.Cases.Domain;

/// <summary>
/// Why a claim became a case and how likely that was: every claim at or above the threshold is
/// queued (probability 1); below it a claim is queued only when drawn for the audit sample, with the
/// sampling share as its probability. The probability is what inverse-propensity weights divide by.
/// </summary>
public sealed record CaseSelection
{
    public static readonly CaseSelection ByThreshold = new(false, 1.0);

    private CaseSelection(bool auditSample, double probability) => (AuditSample, Probability) = (auditSample, probability);

    public bool AuditSample { get; }
    public double Probability { get; }

    public static CaseSelection Audit(double share) =>
        share is > 0 and <= 1
            ? new CaseSelection(true, share)
            : throw new DomainRuleException($"An audit-sample case needs a selection probability above 0 and at most 1 (got {share}).");
}
