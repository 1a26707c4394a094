using System.Globalization;
using CsvHelper;
using Triage.Cases.Domain;
using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Cases.FirstStart;

/// <summary>A claim row from a seed CSV, dates already moved to the present.</summary>
public sealed record SeedClaim(Claim Claim, IReadOnlyDictionary<string, string?> Values, VerdictOutcome? Outcome);

/// <summary>
/// Reads history.csv and open-claims.csv. Columns starting with '_' are generator truth and are dropped
/// unread; every date field moves by <c>shiftDays</c> so the scenario's "as of" day becomes today.
/// </summary>
public static class SeedClaims
{
    public const string OutcomeColumn = "outcome";
    public const string ClosedDateColumn = "closed_date";

    public static List<SeedClaim> Read(string path, ClaimSchema schema, int shiftDays, bool history)
    {
        if (!File.Exists(path)) throw new FileNotFoundException($"Seed file '{path}' is missing.", path);
        using var csv = CsvReader.FromFile(path);
        var header = csv.Headers.ToList();
        if (header.Count == 0) throw new InvalidDataException($"{path}: the file has no header row.");
        var required = schema.Fields.Select(f => f.Name).Concat(history ? [OutcomeColumn, ClosedDateColumn] : []);
        var missing = required.FirstOrDefault(r => !header.Contains(r));
        if (missing is not null) throw new InvalidDataException($"{path}: column '{missing}' is missing.");

        var dateFields = schema.Fields.Where(f => f.Type == FieldType.Date).Select(f => f.Name).ToHashSet();
        var columns = schema.Fields.Select(f => (f.Name, Index: header.IndexOf(f.Name))).ToArray();
        var rows = new List<SeedClaim>();
        var outcomeAt = header.IndexOf(OutcomeColumn);
        var closedAt = header.IndexOf(ClosedDateColumn);
        while (csv.Read())
        {
            var row = csv.RowNumber;
            try
            {
                var values = new Dictionary<string, string?>(columns.Length);
                foreach (var (name, index) in columns)
                {
                    var raw = csv.GetString(index);
                    values[name] = dateFields.Contains(name) ? Shift(raw, shiftDays, name) : Blank(raw);
                }
                var outcome = history ? ParseOutcome(csv.GetString(outcomeAt)) : (VerdictOutcome?)null;
                var claim = ToClaim(schema, values);
                if (history)
                {
                    var closed = Shift(csv.GetString(closedAt), shiftDays, ClosedDateColumn)
                        ?? throw new InvalidDataException($"Column '{ClosedDateColumn}' is empty.");
                    claim.Settle(outcome!.Value, ParseDate(closed, ClosedDateColumn));
                }
                rows.Add(new SeedClaim(claim, values, outcome));
            }
            catch (Exception e) when (e is InvalidDataException or DomainRuleException or FormatException)
            {
                throw new InvalidDataException($"{path}, data row {row}: {e.Message}", e);
            }
        }
        return rows;
    }

    /// <summary>Builds a claim from raw values, reading the role fields the schema names.</summary>
    public static Claim ToClaim(ClaimSchema schema, IReadOnlyDictionary<string, string?> values)
    {
        var r = schema.Roles;
        DateTime? Date(string? field) => field is null ? null : ClaimValues.Date(values, field)?.ToDateTime(TimeOnly.MinValue, DateTimeKind.Utc);
        var number = ClaimValues.Raw(values, r.ClaimNumber) ?? throw new InvalidDataException($"Field '{r.ClaimNumber}' is empty.");
        var line = ClaimValues.Raw(values, r.Line) ?? throw new InvalidDataException($"Field '{r.Line}' is empty.");
        var amount = ClaimValues.Number(values, r.Amount);
        if (double.IsNaN(amount)) throw new InvalidDataException($"Field '{r.Amount}' is empty.");
        var reported = Date(r.ReportDate) ?? throw new InvalidDataException($"Field '{r.ReportDate}' is empty.");
        return Claim.Receive(number, line, reported, Date(r.LossDate), Date(r.PolicyStart), amount, values);
    }

    private static VerdictOutcome ParseOutcome(string? raw) => raw?.Trim() switch
    {
        "confirmed_fraud" => VerdictOutcome.ConfirmedFraud,
        "not_fraud" => VerdictOutcome.NotFraud,
        "inconclusive" => VerdictOutcome.Inconclusive,
        _ => throw new InvalidDataException($"Column '{OutcomeColumn}' must be confirmed_fraud, not_fraud or inconclusive (got '{raw}')."),
    };

    private static string? Blank(string? raw) => string.IsNullOrWhiteSpace(raw) ? null : raw.Trim();

    private static string? Shift(string? raw, int days, string column) =>
        Blank(raw) is { } v ? DateOnly.FromDateTime(ParseDate(v, column)).AddDays(days).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture) : null;

    private static DateTime ParseDate(string raw, string column) =>
        DateTime.TryParseExact(raw, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.AssumeUniversal | DateTimeStyles.AdjustToUniversal, out var d)
            ? DateTime.SpecifyKind(d, DateTimeKind.Utc)
            : throw new InvalidDataException($"Column '{column}': '{raw}' is not a date in the form yyyy-MM-dd.");
}
