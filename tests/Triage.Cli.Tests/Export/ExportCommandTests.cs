using System.CommandLine;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Support;
using Triage.Cli.Tests.Support;
using Triage.Cli.Export;
using static Triage.Cases.Tests.Export.OutcomeFiles;

namespace Triage.Cli.Tests.Export;

/// <summary>The export command in-process over a temp store seeded with the tiny scenario (demo on, so closed history cases exist).</summary>
public sealed class ExportCommandTests() : TinyStoreCommandTest(400, 10)
{
    protected override IReadOnlyDictionary<string, string?> ExtraSettings { get; } = DemoOn(("Queue:Threshold", "0.25"));

    protected override IEnumerable<Command> Commands(Action<IConfigurationBuilder> configure) =>
        [ExportCommand.Create(configure)];

    [Fact]
    public async Task Csv_and_parquet_exports_hold_the_same_rows_and_filters_apply()
    {
        var csvFile = Path.Combine(Dir, "out.csv");
        var (exit, stdout, stderr) = Run("export", "--format", "csv", "--out", csvFile);
        Assert.True(exit == 0, stderr);
        var (header, rows) = ReadCsv(await File.ReadAllBytesAsync(csvFile));
        Assert.NotEmpty(rows);
        Assert.Contains($"Exported {rows.Count} row(s) (all verdict dates, all lines, all models, inconclusive left out)", stdout);
        Assert.Equal("claim_number", header[0]);
        Assert.All(rows, r => Assert.Contains(r["label"], new[] { "0", "1" }));

        var parquetFile = Path.Combine(Dir, "out.parquet");
        Assert.Equal(0, Run("export", "--format", "parquet", "--out", parquetFile, "--pseudonymise", "--include-inconclusive").Exit);
        var (_, columns) = await ReadParquetAsync(await File.ReadAllBytesAsync(parquetFile));
        Assert.True(columns["claim_pseudonym"].Count >= rows.Count);
        Assert.All(columns["claim_pseudonym"], p => Assert.StartsWith("ps-", (string)p!));

        var motorFile = Path.Combine(Dir, "motor.csv");
        Assert.Equal(0, Run("export", "--format", "csv", "--out", motorFile, "--line", "motor", "--from", "2000-01-01", "--to", "2100-12-31").Exit);
        var motor = ReadCsv(await File.ReadAllBytesAsync(motorFile)).Rows;
        Assert.Equal(rows.Count(r => r["line_of_business"] == "motor"), motor.Count);
    }

    [Fact]
    public void Bad_dates_and_formats_are_refused_and_leave_no_file()
    {
        var file = Path.Combine(Dir, "bad.csv");
        var (exit, _, stderr) = Run("export", "--format", "csv", "--out", file, "--from", "31/12/2026");
        Assert.Equal(2, exit);
        Assert.Contains("--from must be a date as yyyy-MM-dd (got '31/12/2026')", stderr);
        Assert.NotEqual(0, Run("export", "--format", "xlsx", "--out", file).Exit);
        Assert.False(File.Exists(file));
    }
}
