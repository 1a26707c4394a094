namespace Triage.Cases.Domain;

/// <summary>A driver snapshot replaced when the case was re-scored by a newly promoted model; kept for the record.</summary>
public sealed class SupersededDriver
{
    private SupersededDriver() { }

    internal SupersededDriver(DriverSnapshot d, string modelVersion, DateTime supersededAt)
    {
        CaseId = d.CaseId;
        ModelVersion = modelVersion;
        SupersededAt = supersededAt;
        Rank = d.Rank;
        Field = d.Field;
        DisplayName = d.DisplayName;
        ValueText = d.ValueText;
        Contribution = d.Contribution;
        EffectPoints = d.EffectPoints;
        Comparison = d.Comparison;
    }

    public long Id { get; private set; }
    public int CaseId { get; private set; }
    /// <summary>The model that produced this snapshot.</summary>
    public string ModelVersion { get; private set; } = "";
    public DateTime SupersededAt { get; private set; }
    public int Rank { get; private set; }
    public string Field { get; private set; } = "";
    public string DisplayName { get; private set; } = "";
    public string ValueText { get; private set; } = "";
    public double Contribution { get; private set; }
    public double EffectPoints { get; private set; }
    public string Comparison { get; private set; } = "";
}
