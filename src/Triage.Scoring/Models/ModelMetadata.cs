namespace Triage.Scoring.Models;

/// <summary>What a model is, where it came from and how well it did on the time-based holdout.</summary>
public sealed record ModelMetadata(
    string Version,
    TrainerKind Trainer,
    DateTime TrainedAtUtc,
    string TrainingDataHash,
    int TrainingRows,
    int HoldoutRows,
    double TrainingFraudRate,
    HoldoutMetrics Holdout,
    string? TrainedBy);

/// <summary>ROC AUC, PR AUC (average precision), Brier score and log loss (nats); NaN when the holdout lacks a class.</summary>
public sealed record HoldoutMetrics(double RocAuc, double PrAuc, double Brier, double LogLoss);
