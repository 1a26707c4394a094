namespace Triage.Cases.Intake;

/// <summary>
/// One thing wrong with the input. Row is the data row (1 = the first row after the header; 0 = the
/// header or the file as a whole); Column and Value are given when the problem sits in one cell.
/// </summary>
public sealed record RowError(int Row, string? Column, string? Value, string Problem)
{
    public override string ToString() =>
        (Row == 0 ? "file" : $"row {Row}") + (Column is null ? "" : $", column '{Column}'")
        + (Value is null ? "" : $", value '{Shorten(Value)}'") + $": {Problem}";

    public static string Shorten(string value) => value.Length <= 60 ? value : value[..57] + "...";
}

/// <summary>
/// What an import did. Rejected: nothing was stored and <see cref="Errors"/> says why (at most the
/// configured cap, <see cref="ErrorCount"/> counts them all). Otherwise every row was accepted.
/// </summary>
public sealed record ImportReport(
    string Source,
    int Rows,
    int Stored,
    int Duplicates,
    int Queued,
    int ErrorCount,
    IReadOnlyList<RowError> Errors)
{
    public bool Rejected => ErrorCount > 0;
    /// <summary>Rejected because the input has more rows than the source allows.</summary>
    public bool OverRowLimit { get; init; }
    public int ScoredOnly => Stored - Queued;
    /// <summary>Where the time went, for the log and the bench.</summary>
    public ImportTimings? Timings { get; init; }

    public string Summary => Rejected
        ? $"{Source}: rejected, nothing stored; {ErrorCount} error(s) in {Rows} row(s)" + (ErrorCount > Errors.Count ? $", the first {Errors.Count} listed" : "") + "."
        : $"{Source}: {Rows} row(s); {Stored} new claim(s) stored and scored, {Queued} queued as cases, {Duplicates} duplicate(s) already stored.";
}

/// <param name="Checking">The first pass: reading, checking every row, comparing with the store.</param>
/// <param name="Scoring">Scoring, explaining and opening cases, in the second pass (beside writing, on the other cores).</param>
/// <param name="Writing">Writing rows and committing, in the second pass.</param>
public sealed record ImportTimings(TimeSpan Total, TimeSpan Checking, TimeSpan Scoring, TimeSpan Writing);

public enum ImportFormat { Csv, Json }

/// <summary>Where the claims come from. <paramref name="Open"/> is called once per pass, so it must give the same bytes each time.</summary>
public sealed record ImportSource(string Name, ImportFormat Format, Func<Stream> Open, char Delimiter = ',', int? MaxRows = null)
{
    public static ImportSource FromFile(string path, char delimiter = ',', int? maxRows = null) =>
        new(Path.GetFileName(path), path.EndsWith(".json", StringComparison.OrdinalIgnoreCase) ? ImportFormat.Json : ImportFormat.Csv,
            () => new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan), delimiter, maxRows);
}

/// <param name="Stage">"Checking" (first pass: every row validated) or "Storing" (second pass: scored and stored).</param>
/// <param name="Fraction">0–1 within the stage.</param>
public sealed record ImportProgress(string Stage, double Fraction, int Rows);
