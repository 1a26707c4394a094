using System.Globalization;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Features;

/// <summary>Reads typed values out of a claim's invariant strings; a malformed value names its field.</summary>
public static class ClaimValues
{
    public static string? Raw(IReadOnlyDictionary<string, string?> claim, string field) =>
        claim.TryGetValue(field, out var v) && !string.IsNullOrWhiteSpace(v) ? v.Trim() : null;

    public static double Number(IReadOnlyDictionary<string, string?> claim, string field)
    {
        var v = Raw(claim, field);
        if (v is null) return double.NaN;
        return double.TryParse(v, NumberStyles.Float, CultureInfo.InvariantCulture, out var d) && double.IsFinite(d)
            ? d
            : throw new InvalidDataException($"Field '{field}': '{v}' is not a number (use digits and a '.' decimal point).");
    }

    public static DateOnly? Date(IReadOnlyDictionary<string, string?> claim, string field)
    {
        var v = Raw(claim, field);
        if (v is null) return null;
        if (IsoDate(v) is { } quick) return quick;
        return DateOnly.TryParseExact(v, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var d)
            ? d
            : throw new InvalidDataException($"Field '{field}': '{v}' is not a date in the form yyyy-MM-dd.");
    }

    /// <summary>
    /// The plain form yyyy-MM-dd read digit by digit, as TryParseExact would read it but about twenty times faster (a
    /// retrain reads five dates of each of 50,000 claims several times); anything else is left to TryParseExact.
    /// </summary>
    private static DateOnly? IsoDate(string v)
    {
        if (v.Length != 10 || v[4] != '-' || v[7] != '-') return null;
        static int Digits(string s, int at, int count)
        {
            var n = 0;
            for (var i = at; i < at + count; i++)
            {
                var c = s[i] - '0';
                if ((uint)c > 9) return -1;
                n = n * 10 + c;
            }
            return n;
        }
        var (year, month, day) = (Digits(v, 0, 4), Digits(v, 5, 2), Digits(v, 8, 2));
        return year >= 1 && month is >= 1 and <= 12 && day >= 1 && day <= DateTime.DaysInMonth(year, month) ? new DateOnly(year, month, day) : null;
    }

    /// <summary>1 for yes, 0 for no, NaN when missing.</summary>
    public static double YesNo(IReadOnlyDictionary<string, string?> claim, string field) =>
        Raw(claim, field)?.ToLowerInvariant() switch
        {
            null => double.NaN,
            "yes" => 1.0,
            "no" => 0.0,
            var v => throw new InvalidDataException($"Field '{field}': '{v}' is not 'yes' or 'no'."),
        };

    /// <summary>A number field or a derived value (NaN when missing or undefined).</summary>
    public static double Numeric(ClaimSchema schema, IReadOnlyDictionary<string, string?> claim, string name)
    {
        var derived = schema.Derived.FirstOrDefault(d => d.Name == name);
        return derived is null ? Number(claim, name) : Derive(derived, claim);
    }

    public static double Derive(DerivedSpec d, IReadOnlyDictionary<string, string?> claim)
    {
        switch (d.Kind)
        {
            case DerivedKind.DaysBetween:
                var from = Date(claim, d.Sources[0]);
                var to = Date(claim, d.Sources[1]);
                return from is null || to is null ? double.NaN : to.Value.DayNumber - from.Value.DayNumber;
            case DerivedKind.DayOfMonth:
                return Date(claim, d.Sources[0])?.Day ?? double.NaN;
            case DerivedKind.Ratio:
                var num = Number(claim, d.Sources[0]);
                var den = Number(claim, d.Sources[1]);
                return den == 0.0 ? double.NaN : num / den;
            default:
                throw new InvalidDataException($"Derived field '{d.Name}' has unknown kind '{d.Kind}'.");
        }
    }
}
