using System.Diagnostics;
using CsvHelper;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.Options;
using Triage.Cases.Hosting;
using Triage.Scoring;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Bench.Explain;

/// <summary>
/// How long the demo model (trained with the shipped settings) takes to explain every open demo
/// claim, drivers in plain words included — the work first start and intake do per claim.
/// </summary>
internal static class DemoOpenClaims
{
    public static void Run()
    {
        var home = TriageHome.Locate();
        var seed = Path.Combine(home, "seed-cases");
        var schema = ClaimSchema.Load(Path.Combine(seed, "schema.json"));
        var history = Read(Path.Combine(seed, "history.csv"));
        var open = Read(Path.Combine(seed, "open-claims.csv"));

        var options = new ScoringOptions();
        new ConfigurationBuilder().AddJsonFile(Path.Combine(home, "appsettings.json")).Build()
            .GetSection(ScoringOptions.Section).Bind(options);
        var rows = history.Select(r => new LabelledClaim(r, r["outcome"] == "confirmed_fraud")).ToList();
        var train = Stopwatch.StartNew();
        var model = new ModelTrainer(Options.Create(options)).Train(schema, rows, new TrainingRequest("bench"));
        Console.WriteLine($"demo model: {options.Trainer}, trained on {model.Metadata.TrainingRows:N0} claims (holdout {model.Metadata.HoldoutRows:N0}) in {train.Elapsed.TotalSeconds:F1} s");

        foreach (var claim in open.Take(50)) model.Explain(claim); // warm up
        var one = Stopwatch.StartNew();
        foreach (var claim in open) model.Explain(claim);
        one.Stop();
        var all = Stopwatch.StartNew();
        Parallel.ForEach(open, claim => model.Explain(claim));
        all.Stop();
        Console.WriteLine($"explain all {open.Count} demo open claims, 1 thread: {one.Elapsed.TotalMilliseconds:F0} ms ({one.Elapsed.TotalMilliseconds / open.Count:F3} ms/claim)");
        Console.WriteLine($"explain all {open.Count} demo open claims, {Environment.ProcessorCount} threads: {all.Elapsed.TotalMilliseconds:F0} ms");
    }

    private static List<Dictionary<string, string?>> Read(string path)
    {
        using var reader = CsvReader.FromFile(path);
        var rows = new List<Dictionary<string, string?>>();
        while (reader.Read())
        {
            var row = new Dictionary<string, string?>();
            for (var i = 0; i < reader.Headers.Count; i++)
            {
                var value = reader.GetString(i);
                row[reader.Headers[i]] = value.Length == 0 ? null : value;
            }
            rows.Add(row);
        }
        return rows;
    }
}
