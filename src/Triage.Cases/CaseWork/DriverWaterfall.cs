using Triage.Cases.Domain;

namespace Triage.Cases.CaseWork;

/// <param name="From">Risk in probability points before this driver.</param>
/// <param name="To">Risk in probability points after it.</param>
public sealed record DriverStep(DriverSnapshot Driver, double From, double To);

/// <summary>
/// The case's score built up from the base rate: raising drivers first (largest first), then lowering
/// ones (largest first), each moving the running total by its effect in probability points. The
/// explainer apportions effects so they add up to score − base rate, so the last step ends at the score.
/// </summary>
public sealed record DriverWaterfall(double BasePoints, double ScorePoints, IReadOnlyList<DriverStep> Steps)
{
    public static DriverWaterfall Of(Case c)
    {
        var basePoints = 100 / (1 + Math.Exp(-c.BaseLogOdds));
        var ordered = c.Drivers.Where(d => d.Contribution > 0).OrderByDescending(d => d.Contribution)
            .Concat(c.Drivers.Where(d => d.Contribution < 0).OrderBy(d => d.Contribution));
        var steps = new List<DriverStep>();
        var at = basePoints;
        foreach (var d in ordered)
        {
            steps.Add(new DriverStep(d, at, at + d.EffectPoints));
            at += d.EffectPoints;
        }
        return new DriverWaterfall(basePoints, c.Probability * 100, steps);
    }

    /// <summary>Lowest and highest running total, for scaling a chart.</summary>
    public (double Low, double High) Range()
    {
        var points = Steps.SelectMany(s => new[] { s.From, s.To }).Append(BasePoints).Append(ScorePoints).ToList();
        return (points.Min(), points.Max());
    }
}
