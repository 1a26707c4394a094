namespace Triage.Scoring.Trees;

/// <summary>
/// A LightGBM model read from its text form. <see cref="Objective"/> is the header's objective line as
/// written (e.g. "binary sigmoid:1"). For the binary objective the ensemble's output is the log-odds
/// (raw score × sigmoid); otherwise it is LightGBM's raw score.
/// </summary>
public sealed record LightGbmModel(TreeEnsemble Ensemble, IReadOnlyList<string> FeatureNames, string Objective);
