using Triage.Scoring.Drivers;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Features;

/// <summary>
/// The numeric feature values (number fields and derived values; NaN when missing) of a set of claims, one
/// column per field, parsed once: the field statistics and the drift baseline both need them, and parsing the
/// strings for each of them cost a retrain more than either computation.
/// </summary>
public sealed class NumericColumns
{
    private readonly Dictionary<string, double[]> _columns;

    private NumericColumns(Dictionary<string, double[]> columns) => _columns = columns;

    public static NumericColumns Parse(ClaimSchema schema, IReadOnlyList<IReadOnlyDictionary<string, string?>> claims)
    {
        var names = schema.FeatureNames.Where(n => FieldStats.KindOf(schema, n) == StatKind.Number).ToArray();
        // Fields are independent: several at once.
        var columns = ParallelMap.Ordered(names, name => claims.Select(c => ClaimValues.Numeric(schema, c, name)).ToArray());
        return new(names.Zip(columns).ToDictionary(p => p.First, p => p.Second, StringComparer.Ordinal));
    }

    /// <summary>The values of one number field or derived value, in claim order.</summary>
    public double[] Of(string name) =>
        _columns.TryGetValue(name, out var values) ? values : throw new ArgumentException($"'{name}' is not a numeric feature.", nameof(name));
}
