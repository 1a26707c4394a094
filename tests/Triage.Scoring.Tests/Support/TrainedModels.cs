using Microsoft.Extensions.Options;
using Triage.Scoring.Models;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Support;

/// <summary>One model per trainer on the same seeded synthetic claims, shared by the tests of a collection.</summary>
public sealed class TrainedModels
{
    public static ScoringOptions Options { get; } = new()
    {
        Seed = 7,
        HoldoutMonths = 6,
        FastTree = new() { NumberOfTrees = 60, NumberOfLeaves = 12, MinimumExampleCountPerLeaf = 10, LearningRate = 0.15 },
        FastForest = new() { NumberOfTrees = 40, NumberOfLeaves = 12, MinimumExampleCountPerLeaf = 10 },
    };

    public List<LabelledClaim> Rows { get; } = SyntheticClaims.Generate(4000, seed: 11);
    public ModelTrainer Trainer { get; } = new(Microsoft.Extensions.Options.Options.Create(Options));
    private readonly Dictionary<TrainerKind, Lazy<ScoringModel>> _models;

    public TrainedModels()
    {
        _models = Enum.GetValues<TrainerKind>().ToDictionary(k => k,
            k => new Lazy<ScoringModel>(() => Trainer.Train(SyntheticClaims.Schema, Rows, new TrainingRequest($"test-{k}", k, "tests"))));
    }

    public ScoringModel this[TrainerKind kind] => _models[kind].Value;
}

[CollectionDefinition(Name)]
public sealed class TrainedModelsCollection : ICollectionFixture<TrainedModels>
{
    public const string Name = "Trained synthetic models";
}
