namespace Triage.Scoring.Metrics;

/// <summary>One bin of a calibration table: how many rows, the mean predicted probability and the observed fraud rate.</summary>
public sealed record CalibrationBin(int Bin, int Count, double MeanPredicted, double Observed, double Lowest, double Highest);

public static class Calibration
{
    /// <summary>
    /// Sorts by probability and cuts into <paramref name="bins"/> groups of (nearly) equal count — deciles
    /// by default. Equal-count bins keep every row of a skewed score in a bin with enough rows to read.
    /// </summary>
    public static IReadOnlyList<CalibrationBin> ByQuantile(IReadOnlyList<double> p, IReadOnlyList<bool> y, int bins = 10)
    {
        if (bins < 1) throw new ArgumentOutOfRangeException(nameof(bins), bins, "Need at least one bin.");
        var order = Enumerable.Range(0, p.Count).OrderBy(i => p[i]).ThenBy(i => i).ToArray();
        var result = new List<CalibrationBin>(bins);
        for (var b = 0; b < bins; b++)
        {
            // Row r goes to bin floor(r·bins / n): sizes differ by at most one.
            var from = (int)((long)b * order.Length / bins);
            var to = (int)((long)(b + 1) * order.Length / bins);
            if (to <= from) continue;
            var rows = order[from..to];
            result.Add(new CalibrationBin(b + 1, rows.Length, rows.Average(i => p[i]), rows.Count(i => y[i]) / (double)rows.Length,
                p[rows[0]], p[rows[^1]]));
        }
        return result;
    }
}
