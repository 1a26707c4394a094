using CsvHelper;

namespace Triage.Scoring.Tests.Support;

/// <summary>Reads a claims CSV (header row, invariant values) into one dictionary per row, empty → null.</summary>
public static class ClaimsCsv
{
    public static List<Dictionary<string, string?>> Read(string path)
    {
        using var reader = CsvReader.FromFile(path);
        var rows = new List<Dictionary<string, string?>>();
        string[]? header = null;
        while (reader.Read())
        {
            header ??= [.. reader.Headers];
            var row = new Dictionary<string, string?>(header.Length);
            for (var i = 0; i < header.Length; i++)
            {
                var v = reader.GetString(i);
                row[header[i]] = v.Length == 0 ? null : v;
            }
            rows.Add(row);
        }
        return rows;
    }
}
