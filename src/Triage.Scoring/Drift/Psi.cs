namespace Triage.Scoring.Drift;

/// <summary>Stable below 0.1, watch from 0.1 to 0.25, act above 0.25.</summary>
public enum DriftBand { Stable, Watch, Act }

/// <summary>
/// Population stability index between an expected (training) and an actual (recent) distribution over
/// the same bins: PSI = Σ (actual% − expected%) · ln(actual% / expected%), shares as fractions.
/// </summary>
public static class Psi
{
    /// <summary>
    /// A share below this is raised to it before the sum, so an empty bin adds a large but finite term
    /// instead of an infinite one. The other shares are not rescaled.
    /// </summary>
    public const double Floor = 0.0001;

    /// <summary>
    /// Bands as common practice in credit-risk scorecard monitoring has them (a rule of thumb with no
    /// single source): below 0.1 stable, 0.1 to 0.25 watch, above 0.25 act.
    /// </summary>
    public const double WatchFrom = 0.1, ActAbove = 0.25;

    public static double Compute(IReadOnlyList<double> expected, IReadOnlyList<double> actual, double floor = Floor)
    {
        if (expected.Count != actual.Count)
            throw new ArgumentException($"Expected and actual need the same bins (got {expected.Count} and {actual.Count}).");
        var psi = 0.0;
        for (var i = 0; i < expected.Count; i++)
        {
            var e = Math.Max(expected[i], floor);
            var a = Math.Max(actual[i], floor);
            psi += (a - e) * Math.Log(a / e);
        }
        return psi;
    }

    public static DriftBand Band(double psi) => psi > ActAbove ? DriftBand.Act : psi >= WatchFrom ? DriftBand.Watch : DriftBand.Stable;

    /// <summary>Counts (or weights) as shares of their total; all zeros when the total is zero.</summary>
    public static double[] Shares(IReadOnlyList<double> counts)
    {
        var total = counts.Sum();
        return [.. counts.Select(c => total > 0 ? c / total : 0.0)];
    }
}
