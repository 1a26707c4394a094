using System.Globalization;
using Triage.Scoring.Schema;

namespace Triage.Cases.Intake;

/// <summary>
/// Checks one row against the schema (required, type, range, category, length, date order) and gives
/// its values in the invariant form the store and the model read: trimmed, empty as missing, yes/no in lower case.
/// </summary>
internal static class ClaimRowRules
{
    public const int MaxClaimNumberLength = 64;

    public static Dictionary<string, string?> Check(ClaimSchema schema, IncomingRow row, int maxFieldLength)
    {
        var values = new Dictionary<string, string?>(schema.Fields.Count);
        foreach (var field in schema.Fields)
        {
            var raw = row.Cells.GetValueOrDefault(field.Name);
            var value = string.IsNullOrWhiteSpace(raw) ? null : raw.Trim();
            var problem = value is null
                ? field.MissingAllowed ? null : "a value is required"
                : value.Length > maxFieldLength ? $"the value is {value.Length:N0} characters long; at most {maxFieldLength:N0} are allowed"
                : Problem(field, ref value, schema.Roles);
            if (problem is not null) row.Errors.Add(new RowError(row.Row, field.Name, value is null ? null : RowError.Shorten(value), problem));
            values[field.Name] = value;
        }
        CheckOrder(schema.Roles.PolicyStart, schema.Roles.LossDate, "the policy starts after the loss date", values, row);
        CheckOrder(schema.Roles.LossDate, schema.Roles.ReportDate, "the loss date is after the report date", values, row);
        return values;
    }

    private static string? Problem(FieldSpec field, ref string value, SchemaRoles roles)
    {
        switch (field.Type)
        {
            case FieldType.Number:
                if (!double.TryParse(value, NumberStyles.Float, CultureInfo.InvariantCulture, out var n) || !double.IsFinite(n))
                    return "not a number (use digits and a '.' decimal point, no thousands separator)";
                if (n < field.Min) return $"below the smallest allowed value {Show(field.Min.Value)}";
                if (n > field.Max) return $"above the largest allowed value {Show(field.Max.Value)}";
                return null;
            case FieldType.Category:
                return field.Categories!.Contains(value, StringComparer.Ordinal) ? null
                    : $"not an allowed value; use one of {string.Join(", ", field.Categories!.Take(12))}{(field.Categories!.Count > 12 ? ", ..." : "")}";
            case FieldType.YesNo:
                value = value.ToLowerInvariant();
                return value is "yes" or "no" ? null : "must be 'yes' or 'no' (or empty)";
            case FieldType.Date:
                return DateOnly.TryParseExact(value, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out _) ? null
                    : "not a date in the form yyyy-MM-dd";
            default:
                return field.Name == roles.ClaimNumber && value.Length > MaxClaimNumberLength
                    ? $"a claim number may have at most {MaxClaimNumberLength} characters" : null;
        }
    }

    private static void CheckOrder(string? earlier, string? later, string problem, Dictionary<string, string?> values, IncomingRow row)
    {
        if (earlier is null || later is null) return;
        if (!TryDate(values.GetValueOrDefault(earlier), out var a) || !TryDate(values.GetValueOrDefault(later), out var b) || a <= b) return;
        row.Errors.Add(new RowError(row.Row, earlier, values[earlier], $"{problem} ({later} is {values[later]})"));
    }

    private static bool TryDate(string? v, out DateOnly d) =>
        DateOnly.TryParseExact(v, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out d);

    private static string Show(double v) => v.ToString("0.##", CultureInfo.InvariantCulture);
}
