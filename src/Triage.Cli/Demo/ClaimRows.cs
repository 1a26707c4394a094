using System.Globalization;

namespace Triage.Cli.Demo;

/// <summary>Turns claims into CSV cells in schema order: invariant numbers, yyyy-MM-dd dates, "yes"/"no", empty for missing.</summary>
internal static class ClaimRows
{
    public const string Outcome = "outcome";
    public const string ClosedDate = "closed_date";
    public const string Planted = "_planted";

    public static string[] HistoryHeader(IEnumerable<string> schemaFields) => [.. schemaFields, Outcome, ClosedDate, Planted];

    public static string[] OpenHeader(IEnumerable<string> schemaFields) => [.. schemaFields, Planted];

    public static string[] History(DemoClaim c) =>
        [.. Fields(c), c.Fraud ? "confirmed_fraud" : "not_fraud", Date(c.Closed!.Value), string.Join(';', c.Planted)];

    public static string[] Open(DemoClaim c) => [.. Fields(c), string.Join(';', c.Planted)];

    /// <summary>Same order as <see cref="DemoSchema.Build"/> declares the fields.</summary>
    private static string[] Fields(DemoClaim c) =>
    [
        c.ClaimNumber, c.PolicyNumber, c.ClaimantName, c.Line, c.Cause,
        Date(c.PolicyStart), Date(c.LossDate), Date(c.ReportDate),
        Number(c.LossHour), Money(c.ClaimedAmount), Money(c.PolicyLimit),
        Number(c.CoverRaisedDays), Number(c.AddressChangedDays), Number(c.PriorClaims),
        c.PoliceReport switch { true => "yes", false => "no", null => "" },
        c.Repairer ?? "", Number(c.VehicleAge), c.Branch, c.AgeBand ?? "",
    ];

    private static string Date(DateOnly d) => d.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    private static string Number(int? n) => n?.ToString(CultureInfo.InvariantCulture) ?? "";

    // Whole euros print without decimals, others with two.
    private static string Money(decimal m) =>
        m == decimal.Truncate(m) ? m.ToString("0", CultureInfo.InvariantCulture) : m.ToString("0.00", CultureInfo.InvariantCulture);
}
