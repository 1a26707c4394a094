namespace Triage.Scoring.Metrics;

/// <summary>Holdout metrics of probabilities against 0/1 labels (unweighted).</summary>
public static class BinaryMetrics
{
    /// <summary>
    /// Probability that a random positive scores above a random negative, ties counting one half
    /// (the Mann–Whitney form of the area under the ROC curve). NaN without both classes.
    /// </summary>
    public static double RocAuc(IReadOnlyList<double> p, IReadOnlyList<bool> y)
    {
        var order = Enumerable.Range(0, p.Count).OrderBy(i => p[i]).ToArray();
        double pos = y.Count(v => v), neg = y.Count - pos;
        if (pos == 0 || neg == 0) return double.NaN;
        // Sum of (mid-)ranks of the positives.
        double rankSum = 0;
        for (var start = 0; start < order.Length;)
        {
            var end = start;
            while (end + 1 < order.Length && p[order[end + 1]] == p[order[start]]) end++;
            var midRank = (start + end) / 2.0 + 1.0;
            for (var k = start; k <= end; k++) if (y[order[k]]) rankSum += midRank;
            start = end + 1;
        }
        return (rankSum - pos * (pos + 1) / 2) / (pos * neg);
    }

    /// <summary>
    /// Average precision: Σ (R_k − R_{k−1}) · P_k over the distinct score thresholds, highest first
    /// (tied scores form one threshold). NaN without positives.
    /// </summary>
    public static double AveragePrecision(IReadOnlyList<double> p, IReadOnlyList<bool> y)
    {
        var order = Enumerable.Range(0, p.Count).OrderByDescending(i => p[i]).ToArray();
        double pos = y.Count(v => v);
        if (pos == 0) return double.NaN;
        double tp = 0, seen = 0, ap = 0, prevRecall = 0;
        for (var start = 0; start < order.Length;)
        {
            var end = start;
            while (end + 1 < order.Length && p[order[end + 1]] == p[order[start]]) end++;
            for (var k = start; k <= end; k++) { seen++; if (y[order[k]]) tp++; }
            var recall = tp / pos;
            ap += (recall - prevRecall) * (tp / seen);
            prevRecall = recall;
            start = end + 1;
        }
        return ap;
    }

    /// <summary>
    /// Share of positives among the k highest-scored rows (all rows when k exceeds them). Ties at the cut
    /// are broken by input order, so the figure is one the team could actually have worked. NaN when k &lt; 1.
    /// </summary>
    public static double PrecisionAtK(IReadOnlyList<double> p, IReadOnlyList<bool> y, int k)
    {
        if (k < 1 || p.Count == 0) return double.NaN;
        var top = Enumerable.Range(0, p.Count).OrderByDescending(i => p[i]).ThenBy(i => i).Take(k).ToList();
        return top.Count(i => y[i]) / (double)top.Count;
    }

    /// <summary>Mean squared difference between probability and outcome (Brier 1950).</summary>
    public static double Brier(IReadOnlyList<double> p, IReadOnlyList<bool> y) =>
        p.Count == 0 ? double.NaN : p.Select((v, i) => Math.Pow(v - (y[i] ? 1 : 0), 2)).Average();

    /// <summary>Mean negative log-likelihood in nats; probabilities are clipped to [1e-15, 1 − 1e-15].</summary>
    public static double LogLoss(IReadOnlyList<double> p, IReadOnlyList<bool> y) =>
        p.Count == 0 ? double.NaN : p.Select((v, i) =>
        {
            var q = Math.Clamp(v, 1e-15, 1 - 1e-15);
            return -(y[i] ? Math.Log(q) : Math.Log(1 - q));
        }).Average();
}
