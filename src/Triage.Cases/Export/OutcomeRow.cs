namespace Triage.Cases.Export;

/// <summary>One closed case as exported: the current verdict, the score and the feature values as they were at scoring.</summary>
public sealed record OutcomeRow(
    string ClaimRef,
    string Line,
    DateTime OpenedAt,
    DateTime VerdictAt,
    string Outcome,
    int? Label,
    double Score,
    string ModelVersion,
    bool IsAuditSample,
    double SelectionProbability,
    IReadOnlyDictionary<string, string?> Values);

public enum ExportColumnKind { Number, YesNo, Category }

/// <summary>A feature column: its schema name, how it is typed, and whether the schema marks it as an identifier.</summary>
public sealed record ExportColumn(string Name, ExportColumnKind Kind, bool Identifier);

/// <summary>The fixed columns every export starts with, then the feature columns in schema order.</summary>
public static class OutcomeColumns
{
    public const string ClaimNumber = "claim_number", ClaimPseudonym = "claim_pseudonym", Line = "line_of_business",
        OpenedAt = "case_opened_at", VerdictAt = "verdict_at", Outcome = "outcome", Label = "label", Score = "score",
        ModelVersion = "model_version", AuditSample = "audit_sample", SelectionProbability = "selection_probability";

    public static IReadOnlyList<string> Fixed(bool pseudonymised) =>
        [pseudonymised ? ClaimPseudonym : ClaimNumber, Line, OpenedAt, VerdictAt, Outcome, Label, Score, ModelVersion, AuditSample, SelectionProbability];

    /// <summary>Outcome words in the file: the verdict names investigators see, in snake case.</summary>
    public static string OutcomeWord(Domain.VerdictOutcome o) => o switch
    {
        Domain.VerdictOutcome.ConfirmedFraud => "confirmed_fraud",
        Domain.VerdictOutcome.NotFraud => "not_fraud",
        _ => "inconclusive",
    };

    /// <summary>Confirmed fraud 1, not fraud 0, inconclusive no label.</summary>
    public static int? LabelOf(Domain.VerdictOutcome o) => o switch
    {
        Domain.VerdictOutcome.ConfirmedFraud => 1,
        Domain.VerdictOutcome.NotFraud => 0,
        _ => null,
    };
}
