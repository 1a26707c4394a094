using CsvHelper;
using Triage.Cases.Hosting;
using Triage.Cli.Demo;

namespace Triage.Cli.Tests.Demo;

/// <summary>Generated scenario folders shared by the demo tests (generation is deterministic, so sharing is safe).</summary>
internal static class DemoRun
{
    private static readonly Lazy<string> DefaultFolder = new(() => Generate(new DemoOptions()));

    /// <summary>The default run (seed 7, default sizes) written to a temp folder.</summary>
    public static string Default => DefaultFolder.Value;

    public static string CommittedFolder => Path.Combine(TriageHome.Locate(), "seed-cases");

    public static string Generate(DemoOptions options)
    {
        var folder = Path.Combine(Path.GetTempPath(), "triage-demo-" + Guid.NewGuid().ToString("N"));
        DemoWriter.Write(DemoGenerator.Generate(options), folder);
        return folder;
    }

    /// <summary>Reads a CSV back with CsvHelper into rows keyed by header name.</summary>
    public static List<Dictionary<string, string>> ReadCsv(string path)
    {
        using var reader = CsvReader.FromFile(path);
        var rows = new List<Dictionary<string, string>>();
        string[]? header = null;
        while (reader.Read())
        {
            header ??= [.. reader.Headers];
            var row = new Dictionary<string, string>(header.Length);
            for (var i = 0; i < header.Length; i++) row[header[i]] = reader.GetString(i);
            rows.Add(row);
        }
        return rows;
    }
}
