using Triage.Scoring.Features;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Scoring.Drift;

/// <summary>
/// How the training rows were spread over each feature field's bins and over the score's bins, saved with
/// the model (drift.json) so recent claims can be compared with exactly what the model learnt from.
/// Number bins are the training deciles; rows count with their training weights.
/// </summary>
public sealed record DriftBaseline(int Rows, IReadOnlyList<DriftBins> Fields, DriftBins Score)
{
    public const string ScoreName = "score";
    private const int Deciles = 10;

    /// <summary>From the rows a model was fitted on and its probabilities for them.</summary>
    public static DriftBaseline Compute(ClaimSchema schema, IReadOnlyList<LabelledClaim> rows, IReadOnlyList<double> scores) =>
        WithScores(FieldBins(schema, rows, NumericColumns.Parse(schema, [.. rows.Select(r => r.Values)])), rows, scores);

    /// <summary>The feature fields' bins and training shares: they need no model, so training computes them beside the fit.</summary>
    internal static IReadOnlyList<DriftBins> FieldBins(ClaimSchema schema, IReadOnlyList<LabelledClaim> rows, NumericColumns numeric)
    {
        var weights = rows.Select(r => r.Weight).ToArray();
        // Fields are independent: several at once; numbers are binned from the values parsed once for all fields.
        return ParallelMap.Ordered(schema.FeatureNames, name =>
        {
            if (Drivers.FieldStats.KindOf(schema, name) != Drivers.StatKind.Number)
            {
                var levels = DriftBins.For(schema, name, []);
                return levels with { Expected = Tally(levels, rows.Select(r => levels.BinOf(schema, r.Values)), weights) };
            }
            var values = numeric.Of(name);
            var bins = DriftBins.For(schema, name, DecileEdges(values, weights));
            return bins with { Expected = Tally(bins, values.Select(bins.BinOf), weights) };
        });
    }

    /// <summary>The baseline from the fields' bins and the model's probabilities for the same rows.</summary>
    internal static DriftBaseline WithScores(IReadOnlyList<DriftBins> fields, IReadOnlyList<LabelledClaim> rows, IReadOnlyList<double> scores)
    {
        if (rows.Count != scores.Count) throw new ArgumentException($"{rows.Count} rows but {scores.Count} scores.");
        var weights = rows.Select(r => r.Weight).ToArray();
        var score = DriftBins.For(null, ScoreName, DecileEdges([.. scores], weights));
        return new DriftBaseline(rows.Count, fields, score with { Expected = Tally(score, scores.Select(score.BinOf), weights) });
    }

    /// <summary>
    /// The weighted k/10 quantiles (k = 1..9) of the present values: the smallest value whose cumulative weight
    /// reaches k/10 of the total (with equal weights, Hyndman &amp; Fan 1996 definition 1). Repeated edges are
    /// kept once, so a field with few distinct values gets fewer, wider bins.
    /// </summary>
    internal static IReadOnlyList<double> DecileEdges(double[] values, double[] weights)
    {
        var keep = Enumerable.Range(0, values.Length).Where(i => !double.IsNaN(values[i])).ToArray();
        var present = Array.ConvertAll(keep, i => values[i]);
        var presentWeights = Array.ConvertAll(keep, i => weights[i]);
        // Tied values may come out of the sort in any order: only a value's total weight decides where an edge falls.
        Array.Sort(present, presentWeights);
        var total = presentWeights.Sum();
        var edges = new List<double>();
        if (present.Length == 0 || !(total > 0)) return edges;
        var (k, cumulative) = (1, 0.0);
        for (var i = 0; i < present.Length; i++)
        {
            var value = present[i];
            cumulative += presentWeights[i];
            while (k < Deciles && cumulative >= total * k / Deciles - 1e-12)
            {
                if (edges.Count == 0 || edges[^1] != value) edges.Add(value);
                k++;
            }
        }
        return edges;
    }

    private static double[] Tally(DriftBins bins, IEnumerable<int> binOfRow, double[] weights)
    {
        var sums = new double[bins.Count];
        var r = 0;
        foreach (var b in binOfRow) sums[b] += weights[r++];
        return Psi.Shares(sums);
    }
}
