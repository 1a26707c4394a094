using System.ComponentModel.DataAnnotations;

namespace Triage.Scoring;

public enum TrainerKind { FastTree, FastForest, Lbfgs }

/// <summary>The "Scoring" section: which trainer, its settings, the seed and the holdout window.</summary>
public sealed class ScoringOptions : IValidatableObject
{
    public const string Section = "Scoring";

    [EnumDataType(typeof(TrainerKind))]
    public TrainerKind Trainer { get; set; } = TrainerKind.FastTree;

    public int Seed { get; set; } = 7;

    /// <summary>The last this many months of claims (by report date) are held out for metrics.</summary>
    [Range(1, 120)]
    public int HoldoutMonths { get; set; } = 6;

    public FastTreeSettings FastTree { get; set; } = new();
    public FastForestSettings FastForest { get; set; } = new();
    public LbfgsSettings Lbfgs { get; set; } = new();

    // DataAnnotations does not descend into nested objects, so the sub-sections are checked here.
    public IEnumerable<ValidationResult> Validate(ValidationContext validationContext)
    {
        foreach (var (name, settings) in new (string, object)[] { (nameof(FastTree), FastTree), (nameof(FastForest), FastForest), (nameof(Lbfgs), Lbfgs) })
        {
            var results = new List<ValidationResult>();
            Validator.TryValidateObject(settings, new ValidationContext(settings), results, validateAllProperties: true);
            foreach (var r in results)
                yield return new ValidationResult($"{Section}:{name}: {r.ErrorMessage}", r.MemberNames.Select(m => $"{name}.{m}"));
        }
    }
}

public sealed class FastTreeSettings
{
    [Range(1, 10_000)] public int NumberOfTrees { get; set; } = 100;
    [Range(2, 1_000)] public int NumberOfLeaves { get; set; } = 10;
    [Range(1, 100_000)] public int MinimumExampleCountPerLeaf { get; set; } = 20;
    [Range(1e-6, 1.0)] public double LearningRate { get; set; } = 0.1;
}

public sealed class FastForestSettings
{
    [Range(1, 10_000)] public int NumberOfTrees { get; set; } = 200;
    [Range(2, 1_000)] public int NumberOfLeaves { get; set; } = 20;
    [Range(1, 100_000)] public int MinimumExampleCountPerLeaf { get; set; } = 20;
}

public sealed class LbfgsSettings
{
    [Range(0.0, 1_000.0)] public float L1Regularization { get; set; } = 0.01f;
    [Range(0.0, 1_000.0)] public float L2Regularization { get; set; } = 0.1f;
}
