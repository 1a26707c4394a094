using Triage.Scoring.Features;
using Triage.Scoring.Linear;
using Triage.Scoring.Trees;

namespace Triage.Scoring.Models;

/// <summary>
/// What the explainer needs, stored as explainer.json: the model in log-odds (trees with covers, or
/// linear weights with training means), the column → field map and how missing values are encoded.
/// </summary>
internal sealed record ExplainerPart(IReadOnlyList<FeatureColumn> Columns, MissingEncoding Missing, TreeEnsemble? Trees, LinearExplainer? Linear, Imputation? Imputation)
{
    public int FeatureCount => Trees?.FeatureCount ?? Linear?.FeatureCount ?? 0;
}
