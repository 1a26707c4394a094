namespace Triage.Scoring.Training;

/// <summary>A claim with its verdict label; Weight carries inverse-propensity weights for audited rows.</summary>
public sealed record LabelledClaim(IReadOnlyDictionary<string, string?> Values, bool IsFraud, double Weight = 1.0);

/// <summary>What to train; Settings, when given, replaces the configured "Scoring" section for this run (a retrain chosen on the page).</summary>
public sealed record TrainingRequest(string Version, TrainerKind? Trainer = null, string? TrainedBy = null, ScoringOptions? Settings = null);

public sealed record TrainingProgress(string Stage, double Fraction);
