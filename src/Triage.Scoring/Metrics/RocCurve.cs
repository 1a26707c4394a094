namespace Triage.Scoring.Metrics;

/// <summary>A point of the ROC curve: the rates when every row scored at or above Threshold is flagged.</summary>
public sealed record RocPoint(double FalsePositiveRate, double TruePositiveRate, double Threshold);

public static class RocCurve
{
    /// <summary>
    /// One point per distinct score, highest first, starting at (0, 0); tied scores move the curve
    /// diagonally, which is what makes the trapezoid area equal the Mann–Whitney AUC with ties as one half.
    /// Empty without both classes.
    /// </summary>
    public static IReadOnlyList<RocPoint> Points(IReadOnlyList<double> p, IReadOnlyList<bool> y)
    {
        double pos = y.Count(v => v), neg = y.Count - pos;
        if (pos == 0 || neg == 0) return [];
        var order = Enumerable.Range(0, p.Count).OrderByDescending(i => p[i]).ToArray();
        var points = new List<RocPoint> { new(0, 0, double.PositiveInfinity) };
        double tp = 0, fp = 0;
        for (var start = 0; start < order.Length;)
        {
            var end = start;
            while (end + 1 < order.Length && p[order[end + 1]] == p[order[start]]) end++;
            for (var k = start; k <= end; k++) if (y[order[k]]) tp++; else fp++;
            points.Add(new RocPoint(fp / neg, tp / pos, p[order[start]]));
            start = end + 1;
        }
        return points;
    }

    /// <summary>Keeps at most <paramref name="max"/> points, evenly spaced along the list, with both ends, for drawing.</summary>
    public static IReadOnlyList<RocPoint> Thin(IReadOnlyList<RocPoint> points, int max)
    {
        if (points.Count <= max || max < 2) return points;
        return [.. Enumerable.Range(0, max).Select(i => points[(int)Math.Round(i * (points.Count - 1) / (double)(max - 1))])];
    }

    /// <summary>Trapezoid area under the points.</summary>
    public static double Area(IReadOnlyList<RocPoint> points)
    {
        double area = 0;
        for (var i = 1; i < points.Count; i++)
            area += (points[i].FalsePositiveRate - points[i - 1].FalsePositiveRate) * (points[i].TruePositiveRate + points[i - 1].TruePositiveRate) / 2;
        return area;
    }
}
