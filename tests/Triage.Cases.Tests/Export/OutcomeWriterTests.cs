using Triage.Cases.Export;
using static Triage.Cases.Tests.Export.OutcomeFiles;

namespace Triage.Cases.Tests.Export;

/// <summary>The writers on their own: many rows, a network-like stream, more than one Parquet row group.</summary>
public sealed class OutcomeWriterTests
{
    private static readonly ExportColumn[] Columns =
        [new("amount", ExportColumnKind.Number, false), new("police", ExportColumnKind.YesNo, false), new("cause", ExportColumnKind.Category, false)];

    private static async IAsyncEnumerable<OutcomeRow> Rows(int n)
    {
        for (var i = 0; i < n; i++)
        {
            await Task.Yield();
            yield return new OutcomeRow($"C-{i}", "motor", new DateTime(2027, 1, 1, 0, 0, 0, DateTimeKind.Utc), new DateTime(2027, 2, 1, 8, 30, 0, DateTimeKind.Utc),
                i % 3 == 2 ? "inconclusive" : i % 2 == 0 ? "confirmed_fraud" : "not_fraud", i % 3 == 2 ? null : i % 2 == 0 ? 1 : 0,
                i / 10_000.0, "v1", i % 50 == 0, i % 50 == 0 ? 0.02 : 1.0,
                new Dictionary<string, string?> { ["amount"] = i % 7 == 0 ? null : $"{i}.5", ["police"] = i % 2 == 0 ? "yes" : null, ["cause"] = i % 5 == 0 ? null : "theft" });
        }
    }

    [Fact]
    public async Task Csv_streams_to_a_stream_that_refuses_synchronous_writes()
    {
        using var sink = new AsyncOnlyStream();
        Assert.Equal(2_500, await OutcomeCsv.WriteAsync(sink, Columns, false, Rows(2_500), default));
        var (header, rows) = ReadCsv(sink.ToArray());
        Assert.Equal(["claim_number", "line_of_business", "case_opened_at", "verdict_at", "outcome", "label", "score", "model_version", "audit_sample",
            "selection_probability", "amount", "police", "cause"], header);
        Assert.Equal(2_500, rows.Count);
        Assert.Equal(("C-2499", "0", "", "", "theft"), (rows[^1]["claim_number"], rows[^1]["label"], rows[^1]["amount"], rows[^1]["police"], rows[^1]["cause"]));
        Assert.Equal("2498.5", rows[2498]["amount"]);
        Assert.Equal(("", "inconclusive", "true", "0.02"), (rows[2450]["label"], rows[2450]["outcome"], rows[2450]["audit_sample"], rows[2450]["selection_probability"]));
        Assert.Equal("2027-02-01T08:30:00Z", rows[0]["verdict_at"]);
    }

    [Fact]
    public async Task Parquet_splits_into_row_groups_and_keeps_nulls()
    {
        var n = OutcomeParquet.RowGroupSize + 1_234;
        using var file = new MemoryStream();
        Assert.Equal(n, await OutcomeParquet.WriteAsync(file, Columns, true, Rows(n), default));
        var (fields, columns) = await ReadParquetAsync(file.ToArray());
        Assert.Equal("claim_pseudonym", fields[0].Name);
        Assert.Equal(n, columns["label"].Count);
        Assert.Equal([1, 0, null], columns["label"].Take(3).Select(v => (int?)v));
        Assert.Null(columns["amount"][7]);
        Assert.Equal(8.5, columns["amount"][8]);
        Assert.Equal([true, null], columns["police"].Take(2).Select(v => (bool?)v));
        Assert.Null(columns["cause"][n - 1 - ((n - 1) % 5)]);
        Assert.Equal("theft", columns["cause"][n - 1]);
        Assert.Equal(true, columns["audit_sample"][OutcomeParquet.RowGroupSize]);
        Assert.Equal(0.02, columns["selection_probability"][OutcomeParquet.RowGroupSize]);
    }

    /// <summary>Like a response body: forward-only, and synchronous writes throw.</summary>
    private sealed class AsyncOnlyStream : Stream
    {
        private readonly MemoryStream _inner = new();
        public byte[] ToArray() => _inner.ToArray();
        public override bool CanRead => false;
        public override bool CanSeek => false;
        public override bool CanWrite => true;
        public override long Length => throw new NotSupportedException();
        public override long Position { get => throw new NotSupportedException(); set => throw new NotSupportedException(); }
        public override void Write(byte[] buffer, int offset, int count) => throw new InvalidOperationException("Synchronous operations are disallowed.");
        public override Task WriteAsync(byte[] buffer, int offset, int count, CancellationToken ct) => _inner.WriteAsync(buffer, offset, count, ct);
        public override ValueTask WriteAsync(ReadOnlyMemory<byte> buffer, CancellationToken ct = default) => _inner.WriteAsync(buffer, ct);
        public override void Flush() => throw new InvalidOperationException("Synchronous operations are disallowed.");
        public override Task FlushAsync(CancellationToken ct) => Task.CompletedTask;
        public override int Read(byte[] buffer, int offset, int count) => throw new NotSupportedException();
        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();
        public override void SetLength(long value) => throw new NotSupportedException();
    }
}
