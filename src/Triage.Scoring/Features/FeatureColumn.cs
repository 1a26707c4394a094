namespace Triage.Scoring.Features;

public enum ColumnKind { Number, Level, YesNo, MissingIndicator }

/// <summary>One column of the feature matrix and the claim field (or derived value) it belongs to.</summary>
public sealed record FeatureColumn(string Name, string Field, ColumnKind Kind, string? Level = null);
