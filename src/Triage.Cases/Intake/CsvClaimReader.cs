using System.Runtime.CompilerServices;
using CsvHelper;
using Triage.Scoring.Schema;

namespace Triage.Cases.Intake;

/// <summary>
/// Reads claims CSV with CsvHelper: header required, UTF-8 with or without BOM, RFC 4180 quoting, a
/// chosen delimiter. Bytes that are not UTF-8 decode to U+FFFD, which is refused in the cell it
/// appears in rather than stored as a guess. Columns starting with '_' are ignored, as the
/// schema says of hidden columns; any other column the schema does not know is an error.
/// </summary>
internal static class CsvClaimReader
{
    private const char Replacement = '\uFFFD';
    private static readonly char[] OtherDelimiters = [',', ';', '\t', '|'];

    public static async IAsyncEnumerable<IncomingRow> ReadAsync(Stream stream, ClaimSchema schema, char delimiter, int maxFieldLength,
        [EnumeratorCancellation] CancellationToken ct)
    {
        var options = CsvReaderOptions.Default with
        {
            Separator = delimiter,
            MalformedData = CsvMalformedDataHandling.Throw,
            // An unclosed quote must not swallow the whole file into one record.
            MaxRecordSize = Math.Max(1 << 20, maxFieldLength * 64),
        };
        using var csv = CsvReader.Create(stream, options, leaveOpen: true);

        string[] header = [];
        var failure = await TryAsync(async () => { await csv.ReadHeaderAsync(ct); header = [.. csv.Headers]; }, () => 0);
        if (failure is not null) { yield return IncomingRow.Stop(failure); yield break; }
        var headerErrors = CheckHeader(header, schema, delimiter);
        if (headerErrors.Count > 0) { yield return new IncomingRow(0, [], headerErrors, Fatal: true); yield break; }

        while (true)
        {
            var more = false;
            failure = await TryAsync(async () => more = await csv.ReadAsync(ct), () => (int)csv.RowNumber + 1);
            if (failure is not null) { yield return IncomingRow.Stop(failure); yield break; }
            if (!more) break;
            var row = (int)csv.RowNumber;
            if (csv.FieldCount != header.Length)
            {
                yield return IncomingRow.Broken(row, $"the row has {csv.FieldCount} field(s) but the header has {header.Length}; check the delimiter and the quoting");
                continue;
            }
            var cells = new Dictionary<string, string?>(header.Length);
            var errors = new List<RowError>();
            for (var i = 0; i < header.Length; i++)
            {
                if (header[i].StartsWith('_')) continue;
                var value = csv.GetString(i);
                if (value.Contains(Replacement)) errors.Add(new RowError(row, header[i], null, NotUtf8));
                cells[header[i]] = value;
            }
            yield return new IncomingRow(row, cells, errors);
        }
    }

    private static async Task<RowError?> TryAsync(Func<Task> read, Func<int> row)
    {
        try
        {
            await read();
            return null;
        }
        catch (CsvFormatException e)
        {
            var at = e.RecordNumber > 1 ? (int)e.RecordNumber - 1 : row();
            return new RowError(at, null, null, $"the CSV is malformed ({e.Message}); a quote may be unbalanced or a record too long");
        }
    }

    private const string NotUtf8 = "the value holds bytes that are not UTF-8; save the file as UTF-8 and send it again";

    private static List<RowError> CheckHeader(string[] header, ClaimSchema schema, char delimiter)
    {
        if (header.Length == 0 || header is [""])
            return [new RowError(0, null, null, "the file is empty: the first row must be a header naming the columns")];
        if (header.Any(h => h.Contains('\0')))
            return [new RowError(0, null, null, "the header holds NUL characters: the file looks like UTF-16; save it as UTF-8 and send it again")];
        if (header.Any(h => h.Contains(Replacement)))
            return [new RowError(0, null, null, "the header holds bytes that are not UTF-8; save the file as UTF-8 and send it again")];
        var errors = new List<RowError>();
        var known = schema.Fields.Select(f => f.Name).ToHashSet();
        var columns = header.Select(h => h.Trim()).ToList();
        if (columns.Count == 1 && OtherDelimiters.FirstOrDefault(d => d != delimiter && columns[0].Contains(d)) is var other and not '\0')
            errors.Add(new RowError(0, null, RowError.Shorten(columns[0]),
                $"the header is a single column containing '{Show(other)}': the file seems to use '{Show(other)}' as delimiter, not '{Show(delimiter)}'; say which delimiter it uses"));
        else if (!columns.Any(known.Contains))
            errors.Add(new RowError(0, null, RowError.Shorten(string.Join(delimiter, columns)),
                $"the first row names no known column: a header row is required (expected {string.Join(", ", known.Take(3))}, ...)"));
        foreach (var dup in columns.GroupBy(c => c).Where(g => g.Count() > 1))
            errors.Add(new RowError(0, dup.Key, null, "the column appears more than once in the header"));
        foreach (var unknown in columns.Where(c => !c.StartsWith('_') && !known.Contains(c)).Distinct())
            errors.Add(new RowError(0, unknown, null, "the schema has no such column (hidden columns start with '_')"));
        foreach (var missing in known.Where(k => !columns.Contains(k)))
            errors.Add(new RowError(0, missing, null, "the column is missing from the header"));
        return errors;
    }

    private static string Show(char c) => c == '\t' ? "\\t" : c.ToString();
}
