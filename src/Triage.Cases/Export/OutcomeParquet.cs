using Parquet;
using Parquet.Schema;

namespace Triage.Cases.Export;

/// <summary>
/// Writes outcome rows as Parquet with Parquet.Net, typed: numbers as double, yes/no as bool, categories and
/// identifiers as string, the label as a nullable int, times as UTC timestamps. Rows are buffered one row group
/// at a time, so memory stays bounded by <see cref="RowGroupSize"/> whatever the export's size.
/// </summary>
public static class OutcomeParquet
{
    public const int RowGroupSize = 10_000;

    /// <summary>Parquet needs a seekable stream: callers with a network stream go through a temporary file.</summary>
    public static async Task<int> WriteAsync(Stream to, IReadOnlyList<ExportColumn> columns, bool pseudonymised,
        IAsyncEnumerable<OutcomeRow> rows, CancellationToken ct)
    {
        var fixedNames = OutcomeColumns.Fixed(pseudonymised);
        DataField[] fixedFields =
        [
            new DataField<string>(fixedNames[0], nullable: false),
            new DataField<string>(OutcomeColumns.Line, nullable: false),
            new DateTimeDataField(OutcomeColumns.OpenedAt, DateTimeFormat.Timestamp, isAdjustedToUTC: true, isNullable: false),
            new DateTimeDataField(OutcomeColumns.VerdictAt, DateTimeFormat.Timestamp, isAdjustedToUTC: true, isNullable: false),
            new DataField<string>(OutcomeColumns.Outcome, nullable: false),
            new DataField<int?>(OutcomeColumns.Label),
            new DataField<double>(OutcomeColumns.Score),
            new DataField<string>(OutcomeColumns.ModelVersion, nullable: false),
            new DataField<bool>(OutcomeColumns.AuditSample),
            new DataField<double>(OutcomeColumns.SelectionProbability),
        ];
        var featureFields = columns.Select(c => c.Kind switch
        {
            ExportColumnKind.Number => (DataField)new DataField<double?>(c.Name),
            ExportColumnKind.YesNo => new DataField<bool?>(c.Name),
            _ => new DataField<string>(c.Name, nullable: true),
        }).ToArray();
        var schema = new ParquetSchema([.. fixedFields, .. featureFields]);

        await using var writer = await ParquetWriter.CreateAsync(schema, to, cancellationToken: ct);
        var buffer = new List<OutcomeRow>(RowGroupSize);
        var count = 0;
        await foreach (var r in rows.WithCancellation(ct))
        {
            buffer.Add(r);
            count++;
            if (buffer.Count == RowGroupSize) await FlushAsync(writer, fixedFields, featureFields, columns, buffer, ct);
        }
        // An empty export still gets one (empty) row group, so readers see the columns and zero rows.
        if (buffer.Count > 0 || count == 0) await FlushAsync(writer, fixedFields, featureFields, columns, buffer, ct);
        return count;
    }

    private static async Task FlushAsync(ParquetWriter writer, DataField[] f, DataField[] features, IReadOnlyList<ExportColumn> columns,
        List<OutcomeRow> rows, CancellationToken ct)
    {
        using var group = writer.CreateRowGroup();
        await group.WriteAsync(f[0], [.. rows.Select(r => r.ClaimRef)]);
        await group.WriteAsync(f[1], [.. rows.Select(r => r.Line)]);
        await Values(group, f[2], rows.Select(r => r.OpenedAt), ct);
        await Values(group, f[3], rows.Select(r => r.VerdictAt), ct);
        await group.WriteAsync(f[4], [.. rows.Select(r => r.Outcome)]);
        await Nullable(group, f[5], rows.Select(r => r.Label), ct);
        await Values(group, f[6], rows.Select(r => r.Score), ct);
        await group.WriteAsync(f[7], [.. rows.Select(r => r.ModelVersion)]);
        await Values(group, f[8], rows.Select(r => r.IsAuditSample), ct);
        await Values(group, f[9], rows.Select(r => r.SelectionProbability), ct);
        for (var i = 0; i < columns.Count; i++)
        {
            var (c, field) = (columns[i], features[i]);
            var raw = rows.Select(r => r.Values.GetValueOrDefault(c.Name));
            switch (c.Kind)
            {
                case ExportColumnKind.Number: await Nullable(group, field, raw.Select(ExportValues.Number), ct); break;
                case ExportColumnKind.YesNo: await Nullable(group, field, raw.Select(ExportValues.YesNo), ct); break;
                default: await group.WriteAsync(field, [.. raw.Select(v => v!)]); break;
            }
        }
        rows.Clear();
    }

    private static Task Values<T>(ParquetRowGroupWriter group, DataField field, IEnumerable<T> values, CancellationToken ct) where T : struct =>
        group.WriteAsync(field, new ReadOnlyMemory<T>([.. values]), cancellationToken: ct);

    private static Task Nullable<T>(ParquetRowGroupWriter group, DataField field, IEnumerable<T?> values, CancellationToken ct) where T : struct =>
        group.WriteAsync(field, new ReadOnlyMemory<T?>([.. values]), cancellationToken: ct);
}
