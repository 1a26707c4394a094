using Triage.Scoring.Drift;

namespace Triage.Cases.Drift;

/// <summary>One feature field's drift, with the name people read.</summary>
public sealed record FieldDriftRow(string Field, string DisplayName, FieldDrift Drift)
{
    public double Psi => Drift.Psi;
    public DriftBand Band => Drift.Band;
}

/// <summary>
/// The serving model's training data against the claims reported in the window. When it cannot be computed
/// (no model serving, a model saved before baselines, no recent claims) <see cref="Unavailable"/> says why.
/// </summary>
public sealed record DriftReport(
    string? ModelVersion, int WindowDays, DateOnly From, DateOnly To, int Claims, int TrainingRows,
    IReadOnlyList<FieldDriftRow> Fields, FieldDrift? Score, string? Unavailable, int MinimumClaims = 1)
{
    public bool IsAvailable => Unavailable is null;
    /// <summary>Too few recent claims to tell drift from noise: figures are shown, nothing is flagged.</summary>
    public bool TooFewClaims => IsAvailable && Claims < MinimumClaims;
    /// <summary>Fields past the act threshold, most drifted first (none while there are too few claims).</summary>
    public IReadOnlyList<FieldDriftRow> Flagged => TooFewClaims ? [] : [.. Fields.Where(f => f.Band == DriftBand.Act).OrderByDescending(f => f.Psi)];
    public bool ScoreFlagged => !TooFewClaims && Score?.Band == DriftBand.Act;
}
