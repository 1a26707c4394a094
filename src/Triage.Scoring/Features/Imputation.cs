namespace Triage.Scoring.Features;

/// <summary>
/// For linear models, which cannot take NaN: a missing value becomes the training mean of its column,
/// and every column that was ever missing in training gets an is-missing indicator (same field).
/// </summary>
public sealed record Imputation(double[] Means, int[] IndicatorOf)
{
    public static Imputation Fit(IReadOnlyList<double[]> rows, int columns)
    {
        var sum = new double[columns];
        var count = new int[columns];
        var missing = new bool[columns];
        foreach (var x in rows)
            for (var j = 0; j < columns; j++)
                if (double.IsNaN(x[j])) missing[j] = true;
                else { sum[j] += x[j]; count[j]++; }
        var means = Enumerable.Range(0, columns).Select(j => count[j] == 0 ? 0.0 : (double)(float)(sum[j] / count[j])).ToArray();
        return new(means, [.. Enumerable.Range(0, columns).Where(j => missing[j])]);
    }

    public int OutputCount(int baseCount) => baseCount + IndicatorOf.Length;

    public void Apply(ReadOnlySpan<double> x, Span<double> y)
    {
        for (var j = 0; j < x.Length; j++) y[j] = double.IsNaN(x[j]) ? Means[j] : x[j];
        for (var k = 0; k < IndicatorOf.Length; k++) y[x.Length + k] = double.IsNaN(x[IndicatorOf[k]]) ? 1.0 : 0.0;
    }

    public IEnumerable<FeatureColumn> IndicatorColumns(IReadOnlyList<FeatureColumn> baseColumns) =>
        IndicatorOf.Select(j => new FeatureColumn($"{baseColumns[j].Name}:missing", baseColumns[j].Field, ColumnKind.MissingIndicator));
}
