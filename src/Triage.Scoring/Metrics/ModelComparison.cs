using Triage.Scoring.Features;
using Triage.Scoring.Models;
using Triage.Scoring.Training;

namespace Triage.Scoring.Metrics;

/// <summary>How one model did on the comparison holdout.</summary>
public sealed record Scorecard(
    string Version,
    double RocAuc,
    double PrAuc,
    double PrecisionAtK,
    double Brier,
    IReadOnlyList<CalibrationBin> Calibration,
    IReadOnlyList<RocPoint> Roc,
    IReadOnlyDictionary<string, double> Importance);

/// <summary>Mean |contribution| (log-odds) of one field under each model; Change = challenger − champion.</summary>
public sealed record ImportanceRow(string Field, string DisplayName, double Champion, double Challenger)
{
    public double Change => Challenger - Champion;
}

/// <summary>Champion and challenger scored on the same labelled holdout rows; K is the team's daily capacity.</summary>
public sealed record ComparisonResult(
    int HoldoutRows,
    int HoldoutFraud,
    DateOnly? HoldoutFrom,
    int K,
    Scorecard? Champion,
    Scorecard Challenger,
    IReadOnlyList<ImportanceRow> Importance);

public static class ModelComparison
{
    /// <summary>Points kept per ROC curve: enough to draw, small enough to store with the version.</summary>
    public const int RocPointsKept = 120;

    /// <summary>
    /// Importance is averaged over at most this many holdout rows, evenly spaced (common practice for
    /// global SHAP importance: the mean of |contribution| settles long before every row is explained).
    /// </summary>
    public const int ImportanceRows = 2_000;

    /// <summary>
    /// The challenger against the champion's scorecard (<see cref="Score"/> on the same holdout rows and k; null
    /// when nothing serves): a retrain makes that scorecard while the challenger is fitted, as it needs nothing from it.
    /// </summary>
    public static ComparisonResult Compare(Scorecard? champion, ScoringModel challenger, IReadOnlyList<LabelledClaim> holdout, int k,
        DateOnly? holdoutFrom, CancellationToken ct = default)
    {
        var y = holdout.Select(r => r.IsFraud).ToList();
        var b = Score(challenger, holdout, k, ct);
        var names = new ClaimFeatures(challenger.Schema);
        var importance = challenger.Fields
            .Select(f => new ImportanceRow(f, names.DisplayName(f),
                champion?.Importance.GetValueOrDefault(f) ?? 0, b.Importance.GetValueOrDefault(f)))
            .OrderByDescending(r => Math.Max(r.Champion, r.Challenger))
            .ToList();
        return new ComparisonResult(holdout.Count, y.Count(v => v), holdoutFrom, k, champion, b, importance);
    }

    /// <summary>The fields whose importance moved most (by absolute change), largest first.</summary>
    public static IReadOnlyList<string> MostChanged(ComparisonResult c, int count = 3) =>
        [.. c.Importance.Where(r => Math.Abs(r.Change) > 1e-9).OrderByDescending(r => Math.Abs(r.Change)).Take(count).Select(r => r.Field)];

    /// <summary>One model on the holdout rows: metrics at capacity <paramref name="k"/>, calibration deciles, ROC points, importance.</summary>
    public static Scorecard Score(ScoringModel model, IReadOnlyList<LabelledClaim> rows, int k, CancellationToken ct = default)
    {
        var y = rows.Select(r => r.IsFraud).ToList();
        var p = new double[rows.Count];
        var options = new ParallelOptions { CancellationToken = ct };
        Parallel.For(0, rows.Count, options, i => p[i] = model.Probability(rows[i].Values));

        var sample = Enumerable.Range(0, Math.Min(rows.Count, ImportanceRows)).Select(j => (int)((long)j * rows.Count / Math.Min(rows.Count, ImportanceRows))).ToArray();
        var width = model.Fields.Count;
        var sums = new double[width];
        var gate = new object();
        Parallel.For(0, sample.Length, options, () => new double[width * 2], (j, _, local) =>
        {
            var byField = local.AsSpan(width);
            model.ExplainFields(rows[sample[j]].Values, byField);
            for (var f = 0; f < width; f++) local[f] += Math.Abs(byField[f]);
            return local;
        }, local => { lock (gate) for (var f = 0; f < width; f++) sums[f] += local[f]; });
        var n = Math.Max(sample.Length, 1);
        return new Scorecard(model.Metadata.Version,
            BinaryMetrics.RocAuc(p, y), BinaryMetrics.AveragePrecision(p, y), BinaryMetrics.PrecisionAtK(p, y, k), BinaryMetrics.Brier(p, y),
            Calibration.ByQuantile(p, y), RocCurve.Thin(RocCurve.Points(p, y), RocPointsKept),
            model.Fields.Select((f, i) => (f, i)).ToDictionary(t => t.f, t => sums[t.i] / n));
    }
}
