using System.Globalization;
using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Drivers;

/// <summary>Says in plain words what a claim's value is and how it compares with the training claims.</summary>
public static class DriverWording
{
    public const string NotGiven = "not given";

    public static (string ValueText, string Comparison) Describe(ClaimSchema schema, FieldStats stats, IReadOnlyDictionary<string, string?> claim)
    {
        var unit = schema.Fields.FirstOrDefault(f => f.Name == stats.Field)?.Unit ?? schema.Derived.FirstOrDefault(d => d.Name == stats.Field)?.Unit;
        return stats.Kind switch
        {
            StatKind.Number => DescribeNumber(stats, ClaimValues.Numeric(schema, claim, stats.Field), unit),
            StatKind.YesNo => DescribeYesNo(stats, ClaimValues.Raw(claim, stats.Field)?.ToLowerInvariant()),
            _ => DescribeCategory(stats, ClaimValues.Raw(claim, stats.Field)),
        };
    }

    private static (string, string) DescribeNumber(FieldStats s, double v, string? unit)
    {
        if (double.IsNaN(v))
            return (NotGiven, s.MissingShare > 0
                ? $"not given; {Share(s.MissingShare)} of claims also leave it empty"
                : "not given, although every training claim had a value");
        var text = Format(v, unit);
        if (s.Median is not { } median || s.Q1 is not { } q1 || s.Q3 is not { } q3)
            return (text, "no training claim had a value to compare with");
        if (q1 == q3)
            return (text, v == median
                ? $"the usual value: at least half of claims have {Format(median, unit)}"
                : $"{(v > median ? "higher" : "lower")} than usual; at least half of claims have {Format(median, unit)}");
        var range = $"the middle half of claims lies between {Format(q1, unit)} and {Format(q3, unit)}";
        if (v > q3) return (text, $"higher than three in four claims; {range}");
        if (v < q1) return (text, $"lower than three in four claims; {range}");
        return (text, $"within the usual range; {range} (median {Format(median, unit)})");
    }

    private static (string, string) DescribeCategory(FieldStats s, string? v)
    {
        if (v is null) return (NotGiven, $"none given; {Share(s.MissingShare)} of claims give none");
        var shares = s.Shares ?? new Dictionary<string, double>();
        if (!shares.TryGetValue(v, out var share)) return (v, "a value no training claim had");
        var top = shares.OrderByDescending(p => p.Value).ThenBy(p => p.Key, StringComparer.Ordinal).First();
        return (v, top.Key == v
            ? $"the most common value, on {Share(share)} of claims"
            : $"{Share(share)} of claims have this value; the most common is {top.Key} ({Share(top.Value)})");
    }

    private static (string, string) DescribeYesNo(FieldStats s, string? v)
    {
        if (v is null) return (NotGiven, $"not given; {Share(s.MissingShare)} of claims leave it empty");
        var share = s.Shares?.GetValueOrDefault(v) ?? 0;
        return (v, $"{Share(share)} of claims also say {v}");
    }

    public static string Share(double share) => share switch
    {
        <= 0 => "no",
        < 0.005 => "under 1%",
        > 0.995 and < 1 => "over 99%",
        _ => (share * 100).ToString("0", CultureInfo.InvariantCulture) + "%",
    };

    public static string Format(double v, string? unit)
    {
        var number = unit == "EUR" || Math.Abs(v) >= 1000
            ? v.ToString(Math.Abs(v - Math.Round(v)) < 1e-9 ? "#,0" : "#,0.00", CultureInfo.InvariantCulture)
            : Math.Abs(v) < 0.1 && v != 0
                // Small ratios would round to 0 with two decimals; keep two significant digits.
                ? v.ToString("G2", CultureInfo.InvariantCulture)
                : v.ToString("0.##", CultureInfo.InvariantCulture);
        return unit switch
        {
            null or "" => number,
            "EUR" => $"EUR {number}",
            _ when v == 1 && unit.EndsWith('s') => $"{number} {unit[..^1]}",
            _ => $"{number} {unit}",
        };
    }
}
