namespace Triage.Cases.Insights;

public readonly record struct Interval(double Low, double High);

/// <summary>
/// Wilson's (1927) score interval for a binomial proportion, without continuity correction. Unlike the
/// textbook p ± z·se it stays inside [0, 1] and behaves at 0 and n successes, which small driver groups hit.
/// </summary>
public static class WilsonInterval
{
    /// <summary>The two-sided 95% normal quantile.</summary>
    public const double Z95 = 1.959964;

    public static Interval Of(int successes, int trials, double z = Z95)
    {
        if (trials < 0 || successes < 0 || successes > trials)
            throw new ArgumentOutOfRangeException(nameof(successes), $"Need 0 ≤ successes ≤ trials (got {successes} of {trials}).");
        if (trials == 0) return new Interval(0, 1);
        double n = trials, p = successes / n, z2 = z * z;
        var centre = (p + z2 / (2 * n)) / (1 + z2 / n);
        var half = z / (1 + z2 / n) * Math.Sqrt(p * (1 - p) / n + z2 / (4 * n * n));
        return new Interval(Math.Max(0, centre - half), Math.Min(1, centre + half));
    }
}
