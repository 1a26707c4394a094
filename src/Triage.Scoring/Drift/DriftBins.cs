using System.Globalization;
using System.Text.Json.Serialization;
using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Drift;

public enum DriftBinKind { Number, Category, YesNo }

/// <summary>
/// The bins of one field (or of the score) and the share of training rows in each. Numbers: value ≤ edge 1,
/// then (edge k−1, edge k], then above the last edge, then missing. Categories: one bin per declared
/// level, then "other or missing". Yes/no: no, yes, missing.
/// </summary>
public sealed record DriftBins(string Name, DriftBinKind Kind, IReadOnlyList<double> Edges, IReadOnlyList<string> Levels, IReadOnlyList<double> Expected)
{
    public const string MissingLabel = "missing", OtherLabel = "other or missing";

    [JsonIgnore] public int Count => Kind switch
    {
        DriftBinKind.Number => Edges.Count + 2,
        DriftBinKind.Category => Levels.Count + 1,
        _ => 3,
    };

    /// <summary>Bins for <paramref name="name"/> (a schema feature, or the score with <paramref name="schema"/> null) with no shares yet.</summary>
    internal static DriftBins For(ClaimSchema? schema, string name, IReadOnlyList<double> edges)
    {
        var field = schema?.Fields.FirstOrDefault(f => f.Name == name);
        return field?.Type switch
        {
            FieldType.Category => new(name, DriftBinKind.Category, [], field.Categories ?? [], []),
            FieldType.YesNo => new(name, DriftBinKind.YesNo, [], [], []),
            _ => new(name, DriftBinKind.Number, edges, [], []),
        };
    }

    /// <summary>Which bin a claim's value of this field falls in.</summary>
    public int BinOf(ClaimSchema schema, IReadOnlyDictionary<string, string?> claim) => Kind switch
    {
        DriftBinKind.Number => BinOf(ClaimValues.Numeric(schema, claim, Name)),
        DriftBinKind.YesNo => ClaimValues.YesNo(claim, Name) switch { 0.0 => 0, 1.0 => 1, _ => 2 },
        _ => ClaimValues.Raw(claim, Name) is { } level && IndexOf(level) is var i and >= 0 ? i : Levels.Count,
    };

    /// <summary>Which bin a number falls in (NaN: the missing bin).</summary>
    public int BinOf(double value)
    {
        if (double.IsNaN(value)) return Edges.Count + 1;
        var i = 0;
        while (i < Edges.Count && value > Edges[i]) i++;
        return i;
    }

    public IReadOnlyList<string> Labels()
    {
        string N(double v) => v.ToString("0.####", CultureInfo.InvariantCulture);
        return Kind switch
        {
            DriftBinKind.Category => [.. Levels, OtherLabel],
            DriftBinKind.YesNo => ["no", "yes", MissingLabel],
            _ when Edges.Count == 0 => ["any value", MissingLabel],
            _ => [$"≤ {N(Edges[0])}", .. Edges.Skip(1).Select((e, i) => $"{N(Edges[i])} – {N(e)}"), $"> {N(Edges[^1])}", MissingLabel],
        };
    }

    private int IndexOf(string level)
    {
        for (var i = 0; i < Levels.Count; i++) if (string.Equals(Levels[i], level, StringComparison.Ordinal)) return i;
        return -1;
    }
}
