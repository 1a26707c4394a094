using Triage.Scoring.Trees;

namespace Triage.Scoring.Tests.Explaining;

/// <summary>
/// Seeded random trees for exactness tests. Thresholds and inputs come from a small grid (with 0, NaN
/// and exact ties) so that repeated features on a path, every missing-value rule and the
/// "value == threshold goes left" edge are all exercised.
/// </summary>
internal sealed class RandomTrees(int seed)
{
    private static readonly double[] Grid = [-1.0, -0.5, 0.0, 0.5, 1.0];
    private readonly Random _rng = new(seed);

    public TreeEnsemble Ensemble(int trees, int features, int maxDepth, bool consistentCovers = true)
    {
        var list = new List<RegressionTree>();
        var weights = new double[trees];
        for (var t = 0; t < trees; t++)
        {
            list.Add(Tree(features, maxDepth, consistentCovers));
            weights[t] = 0.2 + _rng.NextDouble();
        }
        return new TreeEnsemble(list, weights, Bias: _rng.NextDouble() - 0.5, features);
    }

    public double[] Row(int features)
    {
        var x = new double[features];
        for (var i = 0; i < features; i++)
        {
            x[i] = _rng.Next(10) switch
            {
                0 or 1 => double.NaN,
                2 => 0.0,
                3 or 4 or 5 => Grid[_rng.Next(Grid.Length)],
                _ => 3 * _rng.NextDouble() - 1.5,
            };
        }
        return x;
    }

    private RegressionTree Tree(int features, int maxDepth, bool consistentCovers)
    {
        var split = new List<int>();
        var threshold = new List<double>();
        var left = new List<int>();
        var right = new List<int>();
        var missing = new List<MissingRouting>();
        var defaultLeft = new List<bool>();
        var nodeCover = new List<double>();
        var leafValue = new List<double>();
        var leafCover = new List<double>();

        // Returns (child index, cover) for the subtree it builds.
        (int Index, double Cover) Build(int depth)
        {
            if (depth == maxDepth || (depth > 0 && _rng.Next(4) == 0))
            {
                leafValue.Add(Math.Round(4 * _rng.NextDouble() - 2, 3));
                // Some leaves no training row reached: their zero fraction is 0.
                var cover = _rng.Next(8) == 0 ? 0.0 : 1 + _rng.Next(60);
                leafCover.Add(cover);
                return (~(leafValue.Count - 1), cover);
            }
            var node = split.Count;
            split.Add(_rng.Next(features));
            threshold.Add(Grid[_rng.Next(Grid.Length)]);
            missing.Add((MissingRouting)_rng.Next(4));
            defaultLeft.Add(_rng.Next(2) == 0);
            left.Add(0);
            right.Add(0);
            nodeCover.Add(0);
            var (l, lc) = Build(depth + 1);
            var (r, rc) = Build(depth + 1);
            left[node] = l;
            right[node] = r;
            var total = lc + rc == 0 ? 1.0 : lc + rc;
            // Inconsistent covers (a node larger than its children, as after bagging) must still be exact.
            nodeCover[node] = consistentCovers ? total : total * (1 + _rng.NextDouble());
            return (node, nodeCover[node]);
        }

        Build(0);
        return new RegressionTree([.. split], [.. threshold], [.. left], [.. right], [.. missing], [.. defaultLeft],
            [.. nodeCover], [.. leafValue], [.. leafCover]);
    }
}
