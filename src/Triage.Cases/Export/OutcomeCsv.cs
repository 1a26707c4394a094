using System.Globalization;
using CsvHelper;

namespace Triage.Cases.Export;

/// <summary>
/// Writes outcome rows as UTF-8 CSV with CsvHelper, one row at a time: invariant numbers, true/false, times as
/// ISO 8601 UTC, an empty field for a missing value or an absent label. CsvHelper writes synchronously, which
/// a response stream refuses, so rows collect in a small buffer that is copied out asynchronously every
/// <see cref="RowsPerChunk"/> rows.
/// </summary>
public static class OutcomeCsv
{
    public const int RowsPerChunk = 1_000;

    public static async Task<int> WriteAsync(Stream to, IReadOnlyList<ExportColumn> columns, bool pseudonymised,
        IAsyncEnumerable<OutcomeRow> rows, CancellationToken ct)
    {
        using var chunk = new MemoryStream();
        using var text = new StreamWriter(chunk, new System.Text.UTF8Encoding(false), 16 * 1024, leaveOpen: true);
        using var csv = CsvWriter.Create(text, CsvWriterOptions.Default, true);
        async Task SendAsync()
        {
            csv.Flush();
            text.Flush();
            await to.WriteAsync(chunk.GetBuffer().AsMemory(0, (int)chunk.Length), ct);
            chunk.SetLength(0);
        }

        foreach (var name in OutcomeColumns.Fixed(pseudonymised).Concat(columns.Select(c => c.Name))) csv.WriteField(name);
        csv.EndRecord();
        var count = 0;
        await foreach (var r in rows.WithCancellation(ct))
        {
            csv.WriteField(r.ClaimRef);
            csv.WriteField(r.Line);
            csv.WriteField(Time(r.OpenedAt));
            csv.WriteField(Time(r.VerdictAt));
            csv.WriteField(r.Outcome);
            csv.WriteField(r.Label?.ToString(CultureInfo.InvariantCulture) ?? "");
            csv.WriteField(Number(r.Score));
            csv.WriteField(r.ModelVersion);
            csv.WriteField(r.IsAuditSample ? "true" : "false");
            csv.WriteField(Number(r.SelectionProbability));
            foreach (var c in columns) csv.WriteField(Value(c, r.Values.GetValueOrDefault(c.Name)));
            csv.EndRecord();
            if (++count % RowsPerChunk == 0) await SendAsync();
        }
        await SendAsync();
        await to.FlushAsync(ct);
        return count;
    }

    private static string Value(ExportColumn c, string? raw) => c.Kind switch
    {
        ExportColumnKind.Number => ExportValues.Number(raw) is { } d ? Number(d) : "",
        ExportColumnKind.YesNo => ExportValues.YesNo(raw) switch { true => "true", false => "false", null => "" },
        _ => raw ?? "",
    };

    private static string Number(double d) => d.ToString("R", CultureInfo.InvariantCulture);

    private static string Time(DateTime t) => t.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture);
}

/// <summary>Snapshot strings as typed values: numbers invariant, yes/no as a bool, empty as missing.</summary>
internal static class ExportValues
{
    public static double? Number(string? raw) =>
        double.TryParse(raw, NumberStyles.Float, CultureInfo.InvariantCulture, out var d) ? d : null;

    public static bool? YesNo(string? raw) => raw?.Trim().ToLowerInvariant() switch
    {
        "yes" => true,
        "no" => false,
        _ => null,
    };
}
