using System.Diagnostics;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.Options;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Support;

/// <summary>The default FastTree model trained once on seed-cases/history.csv, shared by the demo tests.</summary>
public sealed class DemoModel
{
    public ClaimSchema Schema { get; }
    public List<Dictionary<string, string?>> History { get; }
    public List<Dictionary<string, string?>> Open { get; }
    public ScoringModel Model { get; }
    public TimeSpan TrainingTime { get; }

    public DemoModel()
    {
        var history = Repo.SeedCases("history.csv");
        if (!File.Exists(history))
            throw new FileNotFoundException($"The demo data is missing: {history}. Generate it with 'triage demo generate' (docs/demo-scenario.md).");
        Schema = ClaimSchema.Load(Repo.SeedCases("schema.json"));
        History = ClaimsCsv.Read(history);
        Open = ClaimsCsv.Read(Repo.SeedCases("open-claims.csv"));
        var rows = History.Select((r, i) => new LabelledClaim(r, r["outcome"] switch
        {
            "confirmed_fraud" => true,
            "not_fraud" => false,
            var o => throw new InvalidDataException($"history.csv row {i + 2}: outcome '{o}'"),
        })).ToList();
        // The settings the app ships with: the "Scoring" section of the root appsettings.json.
        var options = new ScoringOptions();
        new ConfigurationBuilder().AddJsonFile(Path.Combine(Repo.Root, "appsettings.json")).Build()
            .GetSection(ScoringOptions.Section).Bind(options);
        var watch = Stopwatch.StartNew();
        Model = new ModelTrainer(Options.Create(options)).Train(Schema, rows, new TrainingRequest("demo"));
        TrainingTime = watch.Elapsed;
    }
}

[CollectionDefinition(Name)]
public sealed class DemoModelCollection : ICollectionFixture<DemoModel>
{
    public const string Name = "Demo model";
}
