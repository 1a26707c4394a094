using System.Globalization;

namespace Triage.Cases.Export;

public enum ExportFormat { Csv, Parquet }

/// <summary>
/// Which closed cases an outcomes export takes: current verdicts dated From..To (UTC days, both included),
/// one line of business, one model version; inconclusive verdicts only when asked for.
/// </summary>
public sealed record ExportFilter(
    DateOnly? From = null,
    DateOnly? To = null,
    string? Line = null,
    string? ModelVersion = null,
    bool IncludeInconclusive = false,
    bool Pseudonymise = false)
{
    /// <summary>The filter in words for the audit trail.</summary>
    public string Describe()
    {
        var parts = new List<string>
        {
            From is null && To is null ? "all verdict dates" : $"verdicts {Day(From) ?? "…"} to {Day(To) ?? "…"}",
            Line is null ? "all lines" : $"line {Line}",
            ModelVersion is null ? "all models" : $"model {ModelVersion}",
            IncludeInconclusive ? "inconclusive included" : "inconclusive left out",
        };
        if (Pseudonymise) parts.Add("pseudonymised");
        return string.Join(", ", parts);
    }

    private static string? Day(DateOnly? d) => d?.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
}
