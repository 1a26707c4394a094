using System.Globalization;
using Triage.Scoring.Explaining;
using Triage.Scoring.Models;
using Triage.Scoring.Trees;

namespace Triage.Cli.Explain;

/// <summary>Explains one CSV record; safe to call from several threads.</summary>
internal abstract class RowExplainer
{
    /// <summary>Names of the contribution columns, in output order.</summary>
    public abstract IReadOnlyList<string> Contributions { get; }

    /// <summary>Binds to the input header; throws naming a column the model needs and the file lacks.</summary>
    public abstract void Bind(IReadOnlyList<string> header);

    /// <summary>Writes the contributions and returns (base value, log-odds, probability or NaN when the model has none).</summary>
    public abstract (double Base, double LogOdds, double Probability) Explain(string[] record, Span<double> contributions);

    public static RowExplainer Open(string path)
    {
        if (!File.Exists(path)) throw new FileNotFoundException($"Model file '{path}' does not exist.", path);
        Span<byte> head = stackalloc byte[2];
        using (var file = File.OpenRead(path)) head = head[..file.Read(head)];
        // A Triage model is a zip archive ("PK"); anything else is read as LightGBM model text.
        return head.SequenceEqual("PK"u8) ? new ClaimExplainer(ScoringModel.Load(path)) : new FeatureExplainer(LightGbmModelText.Load(path));
    }
}

/// <summary>A Triage model over claims CSV: one contribution per feature field.</summary>
internal sealed class ClaimExplainer(ScoringModel model) : RowExplainer
{
    private string[] _header = [];

    public override IReadOnlyList<string> Contributions => model.Fields;

    public override void Bind(IReadOnlyList<string> header)
    {
        _header = [.. header];
        var sources = model.Schema.Fields.Where(f => f.Feature).Select(f => f.Name)
            .Concat(model.Schema.Derived.Where(d => d.Feature).SelectMany(d => d.Sources));
        var missing = sources.FirstOrDefault(s => !_header.Contains(s));
        if (missing is not null) throw new InvalidDataException($"the input has no column '{missing}', which the model reads.");
    }

    public override (double, double, double) Explain(string[] record, Span<double> contributions)
    {
        var claim = new Dictionary<string, string?>(_header.Length);
        for (var i = 0; i < _header.Length; i++) claim[_header[i]] = record[i];
        var logOdds = model.ExplainFields(claim, contributions);
        return (model.BaseValue, logOdds, ScoringModel.Sigmoid(logOdds));
    }
}

/// <summary>A LightGBM model text over a feature CSV whose columns are named as the model's features.</summary>
internal sealed class FeatureExplainer(LightGbmModel model) : RowExplainer
{
    private readonly TreeShapExplainer _shap = new(model.Ensemble);
    private readonly bool _binary = model.Objective.StartsWith("binary", StringComparison.Ordinal);
    private int[] _columnOf = [];

    public override IReadOnlyList<string> Contributions => model.FeatureNames;

    public override void Bind(IReadOnlyList<string> header)
    {
        _columnOf = [.. model.FeatureNames.Select(f =>
        {
            var i = header.ToList().IndexOf(f);
            return i >= 0 ? i : throw new InvalidDataException($"the input has no column '{f}', a feature of the model.");
        })];
    }

    public override (double, double, double) Explain(string[] record, Span<double> contributions)
    {
        var x = new double[_columnOf.Length];
        for (var j = 0; j < x.Length; j++)
        {
            var text = record[_columnOf[j]].Trim();
            if (text.Length == 0) x[j] = double.NaN;
            else if (!double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out x[j]))
                throw new InvalidDataException($"column '{model.FeatureNames[j]}': '{text}' is not a number.");
        }
        var output = _shap.Explain(x, contributions);
        return (_shap.ExpectedValue, output, _binary ? ScoringModel.Sigmoid(output) : double.NaN);
    }
}
