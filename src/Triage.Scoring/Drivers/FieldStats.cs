using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Drivers;

public enum StatKind { Number, Category, YesNo }

/// <summary>
/// How a feature field looked across the training claims, for plain-words comparisons:
/// quartiles of numbers, shares of categories and yes/no answers (share of all claims), missing share.
/// </summary>
public sealed record FieldStats(
    string Field,
    StatKind Kind,
    int Count,
    double MissingShare,
    double? Q1 = null,
    double? Median = null,
    double? Q3 = null,
    IReadOnlyDictionary<string, double>? Shares = null)
{
    /// <param name="numeric">The claims' numeric values, parsed once (a retrain shares them with the drift baseline).</param>
    public static IReadOnlyList<FieldStats> Compute(ClaimSchema schema, IReadOnlyList<IReadOnlyDictionary<string, string?>> claims, NumericColumns numeric) =>
        ParallelMap.Ordered(schema.FeatureNames, name => Compute(schema, name, claims, numeric));

    private static FieldStats Compute(ClaimSchema schema, string name, IReadOnlyList<IReadOnlyDictionary<string, string?>> claims, NumericColumns numeric)
    {
        var n = claims.Count;
        var kind = KindOf(schema, name);
        if (kind == StatKind.Number)
        {
            var values = Array.FindAll(numeric.Of(name), v => !double.IsNaN(v));
            Array.Sort(values);
            var missing = n == 0 ? 0 : 1.0 - (double)values.Length / n;
            return values.Length == 0
                ? new(name, kind, n, missing)
                : new(name, kind, n, missing, Quantile(values, 0.25), Quantile(values, 0.5), Quantile(values, 0.75));
        }
        var levels = claims.Select(c => kind == StatKind.YesNo ? ClaimValues.Raw(c, name)?.ToLowerInvariant() : ClaimValues.Raw(c, name)).ToList();
        var shares = levels.Where(l => l is not null).GroupBy(l => l!, StringComparer.Ordinal)
            .ToDictionary(g => g.Key, g => (double)g.Count() / n, StringComparer.Ordinal);
        return new(name, kind, n, n == 0 ? 0 : (double)levels.Count(l => l is null) / n, Shares: shares);
    }

    public static StatKind KindOf(ClaimSchema schema, string name) =>
        schema.Fields.FirstOrDefault(f => f.Name == name)?.Type switch
        {
            FieldType.Category => StatKind.Category,
            FieldType.YesNo => StatKind.YesNo,
            _ => StatKind.Number,
        };

    /// <summary>Linear interpolation between order statistics (Hyndman &amp; Fan 1996, definition 7).</summary>
    public static double Quantile(IReadOnlyList<double> sorted, double q)
    {
        var h = (sorted.Count - 1) * q;
        var lo = (int)Math.Floor(h);
        var hi = Math.Min(lo + 1, sorted.Count - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }
}
