using Microsoft.ML;
using Triage.Scoring.Metrics;

namespace Triage.Scoring.Tests.Metrics;

public class BinaryMetricsTests
{
    private sealed class Row
    {
        public bool Label { get; set; }
        public float Score { get; set; }
        public float Probability { get; set; }
        public bool PredictedLabel { get; set; }
    }

    [Fact]
    public void Hand_worked_example()
    {
        // Worked by hand (definitions as in scikit-learn's roc_auc_score / average_precision_score docs):
        // y = 0,0,1,1; p = 0.1,0.4,0.35,0.8. Of the 4 positive–negative pairs, 3 are ordered right → AUC 0.75.
        // Ranked: 0.8(+) P=1 R=.5; 0.4(−); 0.35(+) P=2/3 R=1 → AP = .5·1 + .5·2/3 = 0.8333…
        double[] p = [0.1, 0.4, 0.35, 0.8];
        bool[] y = [false, false, true, true];
        Assert.Equal(0.75, BinaryMetrics.RocAuc(p, y), 1e-12);
        Assert.Equal(5.0 / 6.0, BinaryMetrics.AveragePrecision(p, y), 1e-12);
        Assert.Equal((0.01 + 0.16 + 0.4225 + 0.04) / 4, BinaryMetrics.Brier(p, y), 1e-12);
        Assert.Equal(-(Math.Log(0.9) + Math.Log(0.6) + Math.Log(0.35) + Math.Log(0.8)) / 4, BinaryMetrics.LogLoss(p, y), 1e-12);
    }

    [Fact]
    public void Ties_count_one_half()
    {
        // Mann–Whitney U with ties as 1/2 (Hanley & McNeil 1982, Radiology 143:29–36): all scores equal → 0.5.
        Assert.Equal(0.5, BinaryMetrics.RocAuc([0.3, 0.3, 0.3, 0.3], [true, false, true, false]), 1e-12);
        // One tied threshold holding everything: precision 1/2 at recall 1.
        Assert.Equal(0.5, BinaryMetrics.AveragePrecision([0.3, 0.3, 0.3, 0.3], [true, false, true, false]), 1e-12);
    }

    [Fact]
    public void Agree_with_ml_net_evaluate()
    {
        // Reference: Microsoft.ML 5.0.1 BinaryClassification.Evaluate. AreaUnderRocCurve is the same
        // quantity; LogLoss there is in bits (log base 2), ours in nats. ML.NET's
        // AreaUnderPrecisionRecallCurve is the "lower trapezoid" estimator (Boyd, Eng & Page 2013), not
        // average precision, so it is only expected to be close on distinct scores.
        var rng = new Random(5);
        var rows = Enumerable.Range(0, 3000).Select(_ =>
        {
            var y = rng.NextDouble() < 0.15;
            var p = 1 / (1 + Math.Exp(-(y ? 1.2 : -0.3) - 1.3 * (rng.NextDouble() * 2 - 1) * 2 + 1.5));
            return new Row { Label = y, Score = (float)p, Probability = (float)p, PredictedLabel = p > 0.5 };
        }).ToList();
        var ml = new MLContext(1);
        var m = ml.BinaryClassification.Evaluate(ml.Data.LoadFromEnumerable(rows));
        var probabilities = rows.Select(r => (double)r.Probability).ToList();
        var labels = rows.Select(r => r.Label).ToList();
        Assert.Equal(m.AreaUnderRocCurve, BinaryMetrics.RocAuc(probabilities, labels), 1e-9);
        Assert.Equal(m.LogLoss, BinaryMetrics.LogLoss(probabilities, labels) / Math.Log(2), 1e-6);
        Assert.Equal(m.AreaUnderPrecisionRecallCurve, BinaryMetrics.AveragePrecision(probabilities, labels), 0.01);
    }
}
