using CsvHelper;
using Parquet;
using Parquet.Schema;

namespace Triage.Cases.Tests.Export;

/// <summary>Exported files read back with the reference readers: CsvHelper 34.0.0 and Parquet.Net 6.1.0.</summary>
public static class OutcomeFiles
{
    public static (List<string> Header, List<Dictionary<string, string>> Rows) ReadCsv(byte[] bytes)
    {
        using var csv = CsvReader.Create(bytes, CsvReaderOptions.Default);
        var header = csv.Headers.ToList();
        var rows = new List<Dictionary<string, string>>();
        while (csv.Read()) rows.Add(header.Select((h, i) => (h, v: csv.GetString(i) ?? "")).ToDictionary(p => p.h, p => p.v));
        return (header, rows);
    }

    /// <summary>Every column of every row group, as the reader types it.</summary>
    public static async Task<(IReadOnlyList<DataField> Fields, Dictionary<string, List<object?>> Columns)> ReadParquetAsync(byte[] bytes)
    {
        using var stream = new MemoryStream(bytes);
        await using var reader = await ParquetReader.CreateAsync(stream);
        var fields = reader.Schema.GetDataFields();
        var columns = fields.ToDictionary(f => f.Name, _ => new List<object?>());
        for (var g = 0; g < reader.RowGroupCount; g++)
        {
            using var group = reader.OpenRowGroupReader(g);
            var n = (int)group.RowCount;
            foreach (var f in fields)
            {
                var values = columns[f.Name];
                if (IsText(f)) { var a = new string?[n]; await group.ReadAsync(f, a.AsMemory()); values.AddRange(a); }
                else if (f.ClrType == typeof(double) && f.IsNullable) { var a = new double?[n]; await group.ReadAsync<double>(f, a.AsMemory()); values.AddRange(a.Cast<object?>()); }
                else if (f.ClrType == typeof(double)) { var a = new double[n]; await group.ReadAsync<double>(f, a.AsMemory()); values.AddRange(a.Cast<object?>()); }
                else if (f.ClrType == typeof(bool) && f.IsNullable) { var a = new bool?[n]; await group.ReadAsync<bool>(f, a.AsMemory()); values.AddRange(a.Cast<object?>()); }
                else if (f.ClrType == typeof(bool)) { var a = new bool[n]; await group.ReadAsync<bool>(f, a.AsMemory()); values.AddRange(a.Cast<object?>()); }
                else if (f.ClrType == typeof(int)) { var a = new int?[n]; await group.ReadAsync<int>(f, a.AsMemory()); values.AddRange(a.Cast<object?>()); }
                else if (f.ClrType == typeof(DateTime)) { var a = new DateTime[n]; await group.ReadAsync<DateTime>(f, a.AsMemory()); values.AddRange(a.Cast<object?>()); }
                else throw new NotSupportedException($"{f.Name}: {f.ClrType}");
            }
        }
        return (fields, columns);
    }

    /// <summary>Parquet.Net 6 reports UTF-8 string columns as ReadOnlyMemory&lt;char&gt;.</summary>
    public static bool IsText(DataField f) => f.ClrType == typeof(string) || f.ClrType == typeof(ReadOnlyMemory<char>);
}
