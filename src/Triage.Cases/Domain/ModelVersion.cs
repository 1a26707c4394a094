using Triage.Scoring.Models;

namespace Triage.Cases.Domain;

/// <summary>A trained model on file and how it did on its holdout; at most one version serves at a time.</summary>
public sealed class ModelVersion
{
    private ModelVersion() { }

    public int Id { get; private set; }
    public string Version { get; private set; } = "";
    public string Trainer { get; private set; } = "";
    /// <summary>Path of the saved model, relative to the data folder.</summary>
    public string FilePath { get; private set; } = "";
    public string TrainingDataHash { get; private set; } = "";
    public int TrainingRows { get; private set; }
    public int HoldoutRows { get; private set; }
    public double TrainingFraudRate { get; private set; }
    public double RocAuc { get; private set; }
    public double PrAuc { get; private set; }
    public double Brier { get; private set; }
    public double LogLoss { get; private set; }
    public string? TrainedBy { get; private set; }
    public DateTime TrainedAt { get; private set; }
    public string? PromotedBy { get; private set; }
    public DateTime? PromotedAt { get; private set; }
    public bool IsServing { get; private set; }

    public static ModelVersion Register(ModelMetadata m, string filePath) => new()
    {
        Version = m.Version,
        Trainer = m.Trainer.ToString(),
        FilePath = filePath,
        TrainingDataHash = m.TrainingDataHash,
        TrainingRows = m.TrainingRows,
        HoldoutRows = m.HoldoutRows,
        TrainingFraudRate = m.TrainingFraudRate,
        RocAuc = m.Holdout.RocAuc,
        PrAuc = m.Holdout.PrAuc,
        Brier = m.Holdout.Brier,
        LogLoss = m.Holdout.LogLoss,
        TrainedBy = m.TrainedBy,
        TrainedAt = Claim.Utc(m.TrainedAtUtc),
    };

    /// <summary>Makes this version the one that scores new claims; the caller passes the one serving now.</summary>
    public void Promote(ModelVersion? serving, Actor by, DateTime at)
    {
        if (IsServing) throw new DomainRuleException($"Model {Version} is already serving.");
        serving?.Retire();
        IsServing = true;
        PromotedBy = by.UserName;
        PromotedAt = Claim.Utc(at);
    }

    private void Retire() => IsServing = false;
}
