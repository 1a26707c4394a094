namespace Triage.Cli.Demo;

/// <summary>The hidden truth of a claim: which mechanisms fired and, once closed, whether it was fraud.</summary>
internal static class Outcomes
{
    public static DemoClaim Plant(DemoClaim claim) =>
        claim with { Planted = [.. Mechanisms.All.Where(m => m.Fires(claim)).Select(m => m.Id)] };

    /// <summary>Fraud ~ Bernoulli(sigmoid(base + Σ effects of fired mechanisms + N(0, NoiseSd²))).</summary>
    public static double LogOdds(DemoClaim claim, double noise) =>
        Mechanisms.BaseLogOdds + Mechanisms.All.Where(m => claim.Planted.Contains(m.Id)).Sum(m => m.Effect) + noise;

    public static DemoClaim Close(DemoRandom random, DemoClaim claim, DateOnly asOf)
    {
        var logOdds = LogOdds(claim, Mechanisms.NoiseSd * random.Normal());
        var fraud = random.Uniform() < 1.0 / (1.0 + Math.Exp(-logOdds));
        // Investigated fraud takes longer to close than an ordinary settlement.
        var daysOpen = fraud ? random.Int(20, 150) : random.Int(3, 75);
        var closed = claim.ReportDate.AddDays(daysOpen);
        return claim with { Fraud = fraud, Closed = closed > asOf ? asOf : closed };
    }
}
