using Triage.Scoring.Schema;

namespace Triage.Scoring.Features;

/// <summary>How a model receives missing values (ML.NET's trainers skip every training row holding a NaN).</summary>
public enum MissingEncoding
{
    /// <summary>Trees: NaN becomes <see cref="FeatureLayout.MissingCode"/>, below every real value, so a split can set missing claims apart.</summary>
    BelowRange,
    /// <summary>Linear models: NaN becomes the training mean, plus an is-missing indicator column of the same field.</summary>
    MeanWithIndicator,
}

/// <summary>The columns a trained model reads: the schema's features with the model's missing-value encoding.</summary>
public sealed class FeatureLayout
{
    /// <summary>Exactly representable as a float, far below any claim value.</summary>
    public const double MissingCode = -1e9;

    public ClaimFeatures Base { get; }
    public MissingEncoding Missing { get; }
    public Imputation? Imputation { get; }
    public IReadOnlyList<FeatureColumn> Columns { get; }
    /// <summary>Column index → index into <see cref="ClaimFeatures.Fields"/>.</summary>
    public int[] FieldOfColumn { get; }

    public FeatureLayout(ClaimSchema schema, MissingEncoding missing, Imputation? imputation)
    {
        Base = new ClaimFeatures(schema);
        Missing = missing;
        Imputation = imputation;
        if (missing == MissingEncoding.MeanWithIndicator && imputation is null)
            throw new InvalidDataException("Mean imputation needs the training means.");
        if (imputation is not null && imputation.Means.Length != Base.Count)
            throw new InvalidDataException($"Imputation covers {imputation.Means.Length} columns but the schema gives {Base.Count}.");
        Columns = missing == MissingEncoding.MeanWithIndicator ? [.. Base.Columns, .. imputation!.IndicatorColumns(Base.Columns)] : Base.Columns;
        var fieldIndex = Base.Fields.Select((f, i) => (f, i)).ToDictionary(p => p.f, p => p.i);
        FieldOfColumn = [.. Columns.Select(c => fieldIndex[c.Field])];
    }

    public int Count => Columns.Count;

    public double[] Encode(IReadOnlyDictionary<string, string?> claim) => Complete(Base.Encode(claim));

    /// <summary>Turns a base encoding (NaN for missing) into the model's input.</summary>
    public double[] Complete(double[] baseRow)
    {
        if (Missing == MissingEncoding.BelowRange)
        {
            var coded = (double[])baseRow.Clone();
            for (var j = 0; j < coded.Length; j++) if (double.IsNaN(coded[j])) coded[j] = MissingCode;
            return coded;
        }
        var y = new double[Count];
        Imputation!.Apply(baseRow, y);
        return y;
    }
}
