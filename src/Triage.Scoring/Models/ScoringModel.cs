using Microsoft.ML;
using Triage.Scoring.Drift;
using Triage.Scoring.Drivers;
using Triage.Scoring.Explaining;
using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Models;

/// <summary>
/// A trained model version: scores and explains claims in log-odds with drivers per field.
/// Immutable and safe to share between threads.
/// </summary>
public sealed class ScoringModel
{
    private readonly TreeShapExplainer? _shap;
    private readonly FieldStats[] _statsByField;

    internal ScoringModel(ModelMetadata metadata, ClaimSchema schema, ExplainerPart part, IReadOnlyList<FieldStats> stats, byte[] mlNetModel,
        DriftBaseline? drift = null)
    {
        Drift = drift;
        Metadata = metadata;
        Schema = schema;
        Part = part;
        Stats = stats;
        MlNetModel = mlNetModel;
        if (part.Trees is null && part.Linear is null) throw new InvalidDataException("The explainer part holds neither trees nor a linear model.");
        Layout = new FeatureLayout(schema, part.Missing, part.Imputation);
        var expected = Layout.Columns.Select(c => c.Name).ToList();
        if (!expected.SequenceEqual(part.Columns.Select(c => c.Name)))
            throw new InvalidDataException(
                $"Feature columns do not match the schema: the schema gives {expected.Count} columns, the explainer has {part.Columns.Count} " +
                $"(first difference: '{expected.Except(part.Columns.Select(c => c.Name)).FirstOrDefault() ?? part.Columns.Select(c => c.Name).Except(expected).FirstOrDefault()}').");
        if (part.FeatureCount != Layout.Count)
            throw new InvalidDataException($"Feature count mismatch: the schema gives {Layout.Count} columns, the model reads {part.FeatureCount}.");
        _statsByField = [.. Layout.Base.Fields.Select(f => stats.FirstOrDefault(s => s.Field == f)
            ?? throw new InvalidDataException($"Field statistics are missing for field '{f}'."))];
        if (part.Trees is not null) _shap = new TreeShapExplainer(part.Trees);
        BaseValue = _shap?.ExpectedValue ?? part.Linear!.ExpectedValue;
    }

    public ModelMetadata Metadata { get; }
    public ClaimSchema Schema { get; }
    /// <summary>Expected log-odds over the training rows: every explanation starts here.</summary>
    public double BaseValue { get; }
    public IReadOnlyList<string> Fields => Layout.Base.Fields;
    /// <summary>How the training rows spread over each field's bins and the score's; null for files saved before baselines.</summary>
    public DriftBaseline? Drift { get; }

    internal FeatureLayout Layout { get; }
    internal ExplainerPart Part { get; }
    internal IReadOnlyList<FieldStats> Stats { get; }
    internal byte[] MlNetModel { get; }

    public void Save(string path) => ModelFile.Write(this, path);

    public static ScoringModel Load(string path) => ModelFile.Read(path);

    public double Probability(IReadOnlyDictionary<string, string?> claim) => Sigmoid(LogOdds(Layout.Encode(claim)));

    public Explanation Explain(IReadOnlyDictionary<string, string?> claim)
    {
        var byField = new double[Fields.Count];
        var logOdds = ExplainFields(claim, byField);

        var probability = Sigmoid(logOdds);
        var total = byField.Sum();
        // Probability points are the change from the base probability, shared out in proportion to
        // log-odds contributions (docs/explanations.md explains the caveat).
        var pointsPerLogOdds = Math.Abs(total) > 1e-12 ? 100.0 * (probability - Sigmoid(BaseValue)) / total : 0.0;
        var drivers = new Driver[Fields.Count];
        for (var f = 0; f < drivers.Length; f++)
        {
            var (valueText, comparison) = DriverWording.Describe(Schema, _statsByField[f], claim);
            drivers[f] = new Driver(Fields[f], Layout.Base.DisplayName(Fields[f]), valueText, byField[f], byField[f] * pointsPerLogOdds, comparison);
        }
        return new Explanation(BaseValue, logOdds, probability, [.. drivers.OrderByDescending(d => d.Contribution)]);
    }

    /// <summary>
    /// Log-odds contributions per field (in <see cref="Fields"/> order) without the wording, for bulk
    /// use; returns the log-odds (= <see cref="BaseValue"/> + Σ contributions).
    /// </summary>
    public double ExplainFields(IReadOnlyDictionary<string, string?> claim, Span<double> byField)
    {
        var x = Layout.Encode(claim);
        var phi = new double[Layout.Count];
        var logOdds = ExplainColumns(x, phi);
        byField[..Fields.Count].Clear();
        for (var j = 0; j < phi.Length; j++) byField[Layout.FieldOfColumn[j]] += phi[j];
        return logOdds;
    }

    /// <summary>Column-level attributions in log-odds; returns the log-odds.</summary>
    internal double ExplainColumns(double[] x, double[] phi) =>
        _shap is not null ? _shap.Explain(x, phi) : Part.Linear!.Explain(x, phi);

    internal double LogOdds(double[] x) => Part.Trees?.Predict(x) ?? Part.Linear!.Predict(x);

    /// <summary>The ML.NET model as trained (for comparisons; scoring here does not need it).</summary>
    internal ITransformer LoadMlNet(MLContext ml)
    {
        using var stream = new MemoryStream(MlNetModel, writable: false);
        return ml.Model.Load(stream, out _);
    }

    public static double Sigmoid(double z) => z >= 0 ? 1.0 / (1.0 + Math.Exp(-z)) : Math.Exp(z) / (1.0 + Math.Exp(z));
}
