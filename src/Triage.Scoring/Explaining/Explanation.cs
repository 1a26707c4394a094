namespace Triage.Scoring.Explaining;

/// <summary>
/// Why a claim got its score, in log-odds: BaseValue (the training expectation) plus the drivers'
/// contributions equals LogOdds; Probability = sigmoid(LogOdds).
/// </summary>
/// <param name="Drivers">One per feature field, raising ones first, lowering ones last.</param>
public sealed record Explanation(double BaseValue, double LogOdds, double Probability, IReadOnlyList<Driver> Drivers)
{
    public Driver this[string field] => Drivers.FirstOrDefault(d => d.Field == field)
        ?? throw new KeyNotFoundException($"The explanation has no driver for field '{field}'.");
}

/// <param name="Contribution">In log-odds.</param>
/// <param name="EffectPoints">In percentage points (0.05 of probability = 5): the change from the base probability, apportioned to this field by its contribution (docs/explanations.md).</param>
/// <param name="Comparison">This claim's value next to the training claims, in plain words.</param>
public sealed record Driver(string Field, string DisplayName, string ValueText, double Contribution, double EffectPoints, string Comparison);
