using Triage.Cases.CaseWork;
using Triage.Cases.Domain;

namespace Triage.Web.Components.Pages.Cases;

/// <summary>The verdict form while it is being filled in; <see cref="Problems"/> says what is missing before it is sent.</summary>
public sealed class VerdictDraft
{
    public VerdictOutcome? Outcome { get; set; }
    public string? Reason { get; set; }
    public string? Note { get; set; }
    public double? AmountSaved { get; set; }

    public IReadOnlyList<string> Reasons => Outcome is { } o ? VerdictReasons.ByOutcome[o] : [];

    public IReadOnlyList<string> Problems(double claimedAmount, bool amending)
    {
        var problems = new List<string>();
        if (Outcome is null) problems.Add("Choose an outcome.");
        else if (Reason is null || !Reasons.Contains(Reason)) problems.Add("Choose a reason that fits the outcome.");
        if (Outcome == VerdictOutcome.ConfirmedFraud && (AmountSaved is null || AmountSaved < 0 || AmountSaved > claimedAmount))
            problems.Add($"Give the amount saved, between 0 and the amount claimed ({CaseFacts.Money(claimedAmount)}).");
        if (amending && string.IsNullOrWhiteSpace(Note)) problems.Add("Say in the note why the verdict is amended.");
        return problems;
    }

    public VerdictInput ToInput() => new(Outcome!.Value, Reason!, string.IsNullOrWhiteSpace(Note) ? null : Note.Trim(),
        Outcome == VerdictOutcome.ConfirmedFraud ? AmountSaved : null);
}
