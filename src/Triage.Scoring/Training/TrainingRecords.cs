namespace Triage.Scoring.Training;

/// <summary>A claim with its verdict label; Weight carries inverse-propensity weights for audited rows.</summary>
public sealed record LabelledClaim(IReadOnlyDictionary<string, string?> Values, bool IsFraud, double Weight = 1.0);

public sealed record TrainingRequest(string Version, TrainerKind? Trainer = null, string? TrainedBy = null);

public sealed record TrainingProgress(string Stage, double Fraction);
