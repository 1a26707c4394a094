using Triage.Cli.Demo;

namespace Triage.Cli.Tests.Demo;

public sealed class DemoDeterminismTests
{
    private static readonly string[] Files =
    [
        DemoWriter.SchemaFile, DemoWriter.ScenarioFile, DemoWriter.HistoryFile,
        DemoWriter.OpenFile, DemoWriter.TeamFile, DemoWriter.PlaybookFile,
    ];

    [Fact]
    public void Same_seed_writes_the_same_bytes()
    {
        var options = new DemoOptions(Seed: 11, HistoryRows: 3000, OpenRows: 120);
        var first = DemoRun.Generate(options);
        var second = DemoRun.Generate(options);
        foreach (var file in Files)
            Assert.True(File.ReadAllBytes(Path.Combine(first, file)).AsSpan().SequenceEqual(File.ReadAllBytes(Path.Combine(second, file))), file);
    }

    [Fact]
    public void Different_seed_writes_different_claims()
    {
        var a = DemoRun.Generate(new DemoOptions(Seed: 11, HistoryRows: 3000, OpenRows: 120));
        var b = DemoRun.Generate(new DemoOptions(Seed: 12, HistoryRows: 3000, OpenRows: 120));
        Assert.NotEqual(File.ReadAllText(Path.Combine(a, DemoWriter.HistoryFile)), File.ReadAllText(Path.Combine(b, DemoWriter.HistoryFile)));
        Assert.NotEqual(File.ReadAllText(Path.Combine(a, DemoWriter.OpenFile)), File.ReadAllText(Path.Combine(b, DemoWriter.OpenFile)));
        // The fixed parts do not depend on the seed.
        Assert.Equal(File.ReadAllText(Path.Combine(a, DemoWriter.TeamFile)), File.ReadAllText(Path.Combine(b, DemoWriter.TeamFile)));
    }

    [Fact]
    public void Committed_seed_cases_are_the_default_run_byte_for_byte()
    {
        foreach (var file in Files)
        {
            var committed = File.ReadAllBytes(Path.Combine(DemoRun.CommittedFolder, file));
            var generated = File.ReadAllBytes(Path.Combine(DemoRun.Default, file));
            Assert.True(committed.AsSpan().SequenceEqual(generated),
                $"seed-cases/{file} differs from a fresh `triage demo generate --seed 7`; regenerate and commit it.");
        }
    }

    [Fact]
    public void Files_are_utf8_without_bom_with_lf_line_ends()
    {
        foreach (var file in Files)
        {
            var bytes = File.ReadAllBytes(Path.Combine(DemoRun.Default, file));
            Assert.False(bytes is [0xEF, 0xBB, 0xBF, ..], $"{file} starts with a byte order mark");
            Assert.DoesNotContain((byte)'\r', bytes);
            Assert.Equal((byte)'\n', bytes[^1]);
        }
    }
}
