namespace Triage.Cases.Domain;

public enum VerdictOutcome { ConfirmedFraud, NotFraud, Inconclusive }

/// <summary>An investigator's finding. Amending never edits a verdict: it supersedes it with a new one.</summary>
public sealed class Verdict
{
    private Verdict() { }

    internal Verdict(int caseId, VerdictOutcome outcome, string reason, string? note, double? amountSaved, string by, DateTime at, int? amends)
    {
        CaseId = caseId;
        Outcome = outcome;
        Reason = reason;
        Note = note;
        AmountSaved = amountSaved;
        By = by;
        At = at;
        AmendsVerdictId = amends;
    }

    public int Id { get; private set; }
    public int CaseId { get; private set; }
    public VerdictOutcome Outcome { get; private set; }
    public string Reason { get; private set; } = "";
    public string? Note { get; private set; }
    public double? AmountSaved { get; private set; }
    public string By { get; private set; } = "";
    public DateTime At { get; private set; }
    public int? AmendsVerdictId { get; private set; }
    public DateTime? SupersededAt { get; private set; }
    public bool IsCurrent => SupersededAt is null;

    internal void Supersede(DateTime at) => SupersededAt = at;
}
