using Microsoft.ML;
using Triage.Scoring.Metrics;

namespace Triage.Scoring.Tests.Metrics;

/// <summary>The metrics the model page compares champion and challenger with, each against an outside definition.</summary>
public class ComparisonMetricsTests
{
    private sealed class Row
    {
        public bool Label { get; set; }
        public float Score { get; set; }
        public float Probability { get; set; }
        public bool PredictedLabel { get; set; }
    }

    /// <summary>Scores rounded to two decimals, so many positives and negatives tie.</summary>
    private static (double[] P, bool[] Y) TiedScores(int n, int seed)
    {
        var rng = new Random(seed);
        var y = Enumerable.Range(0, n).Select(_ => rng.NextDouble() < 0.2).ToArray();
        var p = y.Select(v => Math.Round(Math.Clamp(0.3 + (v ? 0.15 : 0) + 0.25 * (rng.NextDouble() - 0.5), 0, 1), 2)).ToArray();
        return (p, y);
    }

    [Fact]
    public void Roc_auc_equals_ml_net_area_under_roc_curve_with_ties()
    {
        // Reference: Microsoft.ML 5.0.1, MLContext.BinaryClassification.Evaluate → AreaUnderRocCurve,
        // on the same label/score/probability rows.
        var (p, y) = TiedScores(4000, 11);
        Assert.True(p.Distinct().Count() <= 45, "the data must hold many ties");
        var ml = new MLContext(1);
        var rows = p.Select((v, i) => new Row { Label = y[i], Score = (float)v, Probability = (float)v, PredictedLabel = v > 0.5 });
        var m = ml.BinaryClassification.Evaluate(ml.Data.LoadFromEnumerable(rows));
        Assert.Equal(m.AreaUnderRocCurve, BinaryMetrics.RocAuc(p, y), 1e-9);
    }

    [Fact]
    public void Roc_auc_equals_mann_whitney_u_over_n1_n0_with_ties()
    {
        // Hanley & McNeil (1982), Radiology 143:29–36: AUC = U / (n1·n0), where U counts the
        // positive–negative pairs ranked right and a tie counts one half. Brute force over every pair.
        var (p, y) = TiedScores(600, 3);
        double u = 0, n1 = y.Count(v => v), n0 = y.Length - n1;
        for (var i = 0; i < p.Length; i++)
            if (y[i])
                for (var j = 0; j < p.Length; j++)
                    if (!y[j]) u += p[i] > p[j] ? 1 : p[i] == p[j] ? 0.5 : 0;
        Assert.Equal(u / (n1 * n0), BinaryMetrics.RocAuc(p, y), 1e-12);
        // The trapezoid under our ROC points is the same number (ties move the curve diagonally).
        Assert.Equal(u / (n1 * n0), RocCurve.Area(RocCurve.Points(p, y)), 1e-12);
    }

    [Fact]
    public void Roc_points_hand_worked()
    {
        // y = 1,0,1,0 at p = .9,.6,.6,.2 (hand-worked): thresholds .9 → (0, .5); .6 takes one of each → (.5, 1); .2 → (1, 1).
        var points = RocCurve.Points([0.9, 0.6, 0.6, 0.2], [true, false, true, false]);
        Assert.Equal([(0.0, 0.0), (0.0, 0.5), (0.5, 1.0), (1.0, 1.0)], points.Select(q => (q.FalsePositiveRate, q.TruePositiveRate)));
        Assert.Equal(0.875, RocCurve.Area(points), 1e-12);
        Assert.Empty(RocCurve.Points([0.4, 0.5], [true, true]));
    }

    [Fact]
    public void Brier_score_hand_worked()
    {
        // Brier (1950), Monthly Weather Review 78:1–3, for one event: mean of (p − o)². Brier's own sum runs
        // over both outcomes (event and no event), which is exactly twice this binary form.
        // (.9−1)² + (.2−0)² + (.6−0)² + (.4−1)² = .01 + .04 + .36 + .36 = .77 → .77 / 4.
        Assert.Equal(0.1925, BinaryMetrics.Brier([0.9, 0.2, 0.6, 0.4], [true, false, false, true]), 1e-12);
        Assert.Equal(0.0, BinaryMetrics.Brier([1.0, 0.0], [true, false]), 1e-12);
        Assert.Equal(1.0, BinaryMetrics.Brier([0.0, 1.0], [true, false]), 1e-12);
    }

    [Fact]
    public void Precision_at_k_hand_worked()
    {
        // Definition (Manning, Raghavan & Schütze 2008, Introduction to Information Retrieval §8.4):
        // relevant items among the top k. p = .9(+), .8(−), .8(+), .3(−), .1(+); the .8 tie is broken by input order.
        double[] p = [0.9, 0.8, 0.8, 0.3, 0.1];
        bool[] y = [true, false, true, false, true];
        Assert.Equal(1.0, BinaryMetrics.PrecisionAtK(p, y, 1), 12);
        Assert.Equal(0.5, BinaryMetrics.PrecisionAtK(p, y, 2), 12);
        Assert.Equal(2.0 / 3, BinaryMetrics.PrecisionAtK(p, y, 3), 12);
        Assert.Equal(3.0 / 5, BinaryMetrics.PrecisionAtK(p, y, 10), 12);
        Assert.True(double.IsNaN(BinaryMetrics.PrecisionAtK(p, y, 0)));
    }

    [Fact]
    public void Calibration_deciles_hand_worked()
    {
        // 20 rows, p = 0.00, 0.05, …, 0.95; every second row from 0.50 up is fraud. Ten bins of two rows each.
        var p = Enumerable.Range(0, 20).Select(i => i * 0.05).ToArray();
        var y = Enumerable.Range(0, 20).Select(i => i >= 10 && i % 2 == 0).ToArray();
        var bins = Calibration.ByQuantile(p, y);
        Assert.Equal(10, bins.Count);
        Assert.All(bins, b => Assert.Equal(2, b.Count));
        Assert.Equal(0.025, bins[0].MeanPredicted, 12);
        Assert.Equal(0.0, bins[0].Observed);
        Assert.Equal(0.925, bins[9].MeanPredicted, 12);
        Assert.Equal(0.5, bins[9].Observed);
        // Uneven counts: 7 rows in 3 bins → sizes 2, 2, 3 (row r in bin ⌊r·3/7⌋).
        Assert.Equal([2, 2, 3], Calibration.ByQuantile([.1, .2, .3, .4, .5, .6, .7], [false, false, false, false, false, false, true], 3).Select(b => b.Count));
    }
}
