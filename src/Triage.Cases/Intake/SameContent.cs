using System.Globalization;
using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Cases.Intake;

/// <summary>Compares a claim as stored with one arriving, field by field, numbers by value (so 1200 equals 1200.00).</summary>
internal static class SameContent
{
    public static IReadOnlyList<string> Differences(ClaimSchema schema, IReadOnlyDictionary<string, string?> stored, IReadOnlyDictionary<string, string?> arriving) =>
        [.. schema.Fields.Where(f => !Equal(f, ClaimValues.Raw(stored, f.Name), ClaimValues.Raw(arriving, f.Name))).Select(f => f.Name)];

    private static bool Equal(FieldSpec f, string? a, string? b)
    {
        if (a is null || b is null) return a is null && b is null;
        if (f.Type == FieldType.Number
            && double.TryParse(a, NumberStyles.Float, CultureInfo.InvariantCulture, out var x)
            && double.TryParse(b, NumberStyles.Float, CultureInfo.InvariantCulture, out var y))
            return x == y;
        return string.Equals(a, b, f.Type == FieldType.YesNo ? StringComparison.OrdinalIgnoreCase : StringComparison.Ordinal);
    }
}
