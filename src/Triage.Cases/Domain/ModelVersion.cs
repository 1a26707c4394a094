using Triage.Scoring.Models;

namespace Triage.Cases.Domain;

/// <summary>Champion serves new claims (exactly one); a challenger waits to be compared and promoted; retired ones served before.</summary>
public enum ModelStatus { Challenger, Champion, Retired }

/// <summary>
/// A trained model on file and how it did on its holdout. A new version starts as a challenger; promoting
/// it makes it the champion and retires the one serving; rolling back brings a retired version back.
/// Every change is kept in <see cref="Changes"/>.
/// </summary>
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
    public string? PromotionNote { get; private set; }
    public bool IsServing { get; private set; }
    public ModelStatus Status { get; private set; }
    /// <summary>The trainer settings the version was fitted with (JSON), as chosen when the retrain started.</summary>
    public string? SettingsJson { get; private set; }
    /// <summary>The champion this version was compared with when it was trained, and the comparison (JSON).</summary>
    public string? ComparedWith { get; private set; }
    public string? ComparisonJson { get; private set; }
    public List<ModelChange> Changes { get; private set; } = [];

    public static ModelVersion Register(ModelMetadata m, string filePath, string? settingsJson = null) => new()
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
        Status = ModelStatus.Challenger,
        SettingsJson = settingsJson,
        Changes = [new ModelChange(ModelChangeKind.Trained, m.TrainedBy ?? "unknown", Claim.Utc(m.TrainedAtUtc), null, null)],
    };

    public void AttachComparison(string championVersion, string comparisonJson)
    {
        ComparedWith = championVersion;
        ComparisonJson = comparisonJson;
    }

    /// <summary>Makes this challenger the champion; the caller passes the one serving now, which retires.</summary>
    public void Promote(ModelVersion? serving, Actor by, DateTime at, string note)
    {
        switch (Status)
        {
            case ModelStatus.Champion: throw new DomainRuleException($"Model {Version} is already serving.");
            case ModelStatus.Retired: throw new DomainRuleException($"Model {Version} served before and was retired; roll back to it instead of promoting it.");
        }
        Serve(serving, by, at, note, ModelChangeKind.Promoted);
    }

    /// <summary>Brings back a version that served before; the one serving now retires.</summary>
    public void RollBackTo(ModelVersion? serving, Actor by, DateTime at, string note)
    {
        switch (Status)
        {
            case ModelStatus.Champion: throw new DomainRuleException($"Model {Version} is serving now; there is nothing to roll back to.");
            case ModelStatus.Challenger: throw new DomainRuleException($"Model {Version} has never served; promote it instead of rolling back to it.");
        }
        Serve(serving, by, at, note, ModelChangeKind.RolledBack);
    }

    private void Serve(ModelVersion? serving, Actor by, DateTime at, string note, ModelChangeKind kind)
    {
        if (string.IsNullOrWhiteSpace(note)) throw new DomainRuleException($"Say why model {Version} should serve: a note is required.");
        if (serving is not null && (!serving.IsServing || serving == this))
            throw new DomainRuleException($"Model {serving.Version} is not the serving model; reload the model page and try again.");
        at = Claim.Utc(at);
        serving?.Retire(by, at, Version);
        IsServing = true;
        Status = ModelStatus.Champion;
        PromotedBy = by.UserName;
        PromotedAt = at;
        PromotionNote = note.Trim();
        Changes.Add(new ModelChange(kind, by.UserName, at, note.Trim(), serving?.Version));
    }

    private void Retire(Actor by, DateTime at, string replacedBy)
    {
        IsServing = false;
        Status = ModelStatus.Retired;
        Changes.Add(new ModelChange(ModelChangeKind.Retired, by.UserName, at, null, replacedBy));
    }
}

public enum ModelChangeKind { Trained, Promoted, RolledBack, Retired }

/// <summary>One step in a version's life: trained, promoted, rolled back to, or retired (and by which version).</summary>
public sealed class ModelChange
{
    private ModelChange() { }

    internal ModelChange(ModelChangeKind kind, string by, DateTime at, string? note, string? otherVersion)
    {
        Kind = kind;
        By = by;
        At = at;
        Note = note;
        OtherVersion = otherVersion;
    }

    public int Id { get; private set; }
    public int ModelVersionId { get; private set; }
    public ModelChangeKind Kind { get; private set; }
    public string By { get; private set; } = "";
    public DateTime At { get; private set; }
    public string? Note { get; private set; }
    /// <summary>Promoted/rolled back: the version it replaced. Retired: the version that replaced it.</summary>
    public string? OtherVersion { get; private set; }
}
