using Triage.Scoring.Schema;

namespace Triage.Scoring.Features;

/// <summary>
/// The feature matrix the schema defines: numbers as is (missing → NaN, trees route it), one column
/// per category level (unknown or missing level → all zeros), yes/no as 1/0/NaN, dates only through
/// derived values. Values are rounded to float because ML.NET trains and splits on floats.
/// </summary>
public sealed class ClaimFeatures
{
    private readonly Action<IReadOnlyDictionary<string, string?>, Span<double>>[] _writers;

    public ClaimSchema Schema { get; }
    public IReadOnlyList<FeatureColumn> Columns { get; }
    /// <summary>Feature fields and derived values in schema order; every column belongs to one of them.</summary>
    public IReadOnlyList<string> Fields { get; }

    public ClaimFeatures(ClaimSchema schema)
    {
        schema.Validate();
        Schema = schema;
        var columns = new List<FeatureColumn>();
        var writers = new List<Action<IReadOnlyDictionary<string, string?>, Span<double>>>();
        foreach (var f in schema.Fields.Where(f => f.Feature))
        {
            if (f.Protected) throw new ProtectedFieldException(f.Name);
            var at = columns.Count;
            var name = f.Name;
            switch (f.Type)
            {
                case FieldType.Number:
                    columns.Add(new(name, name, ColumnKind.Number));
                    writers.Add((c, x) => x[at] = ClaimValues.Number(c, name));
                    break;
                case FieldType.YesNo:
                    columns.Add(new(name, name, ColumnKind.YesNo));
                    writers.Add((c, x) => x[at] = ClaimValues.YesNo(c, name));
                    break;
                case FieldType.Category:
                    var levels = f.Categories ?? throw new InvalidDataException($"Category field '{name}' declares no categories.");
                    columns.AddRange(levels.Select(l => new FeatureColumn($"{name}={l}", name, ColumnKind.Level, l)));
                    writers.Add((c, x) =>
                    {
                        x.Slice(at, levels.Count).Clear();
                        var v = ClaimValues.Raw(c, name);
                        for (var i = 0; i < levels.Count; i++)
                            if (string.Equals(levels[i], v, StringComparison.Ordinal)) x[at + i] = 1.0;
                    });
                    break;
                default:
                    throw new InvalidDataException($"Field '{name}' has type {f.Type}, which cannot be a feature; dates enter through derived values.");
            }
        }
        foreach (var d in schema.Derived.Where(d => d.Feature))
        {
            var at = columns.Count;
            columns.Add(new(d.Name, d.Name, ColumnKind.Number));
            writers.Add((c, x) => x[at] = ClaimValues.Derive(d, c));
        }
        Columns = columns;
        Fields = [.. schema.FeatureNames];
        _writers = [.. writers];
    }

    public int Count => Columns.Count;

    public void Encode(IReadOnlyDictionary<string, string?> claim, Span<double> x)
    {
        foreach (var w in _writers) w(claim, x);
        for (var i = 0; i < Count; i++) x[i] = (float)x[i];
    }

    public double[] Encode(IReadOnlyDictionary<string, string?> claim)
    {
        var x = new double[Count];
        Encode(claim, x);
        return x;
    }

    public string DisplayName(string field) =>
        Schema.Fields.FirstOrDefault(f => f.Name == field)?.DisplayName
        ?? Schema.Derived.First(d => d.Name == field).DisplayName;
}
