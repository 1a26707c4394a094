using Triage.Scoring.Trees;
using MlTree = Microsoft.ML.Trainers.FastTree.RegressionTreeBase;

namespace Triage.Scoring.Training;

/// <summary>A converted ensemble and its log-odds for each training row (the drift baseline's scores).</summary>
internal sealed record ConvertedTrees(TreeEnsemble Ensemble, double[] TrainLogOdds);

/// <summary>
/// Copies an ML.NET tree ensemble into our flat trees, scaled so the output is log-odds:
/// ML.NET's Platt probability is 1/(1+exp(Slope·Score+Offset)), so log-odds = −Slope·Score − Offset.
/// Node covers are not public in ML.NET; they are counted by routing the (weighted) training rows.
/// </summary>
internal static class TreeConversion
{
    /// <summary>Rows per block of the counting pass; fixed, so block sums and their order never depend on scheduling.</summary>
    private const int BlockRows = 2_048;

    public static ConvertedTrees ToLogOdds<T>(Microsoft.ML.Trainers.FastTree.TreeEnsemble<T> ensemble, double scoreScale, double slope, double offset,
        IReadOnlyList<double[]> trainX, IReadOnlyList<double> weights, int featureCount) where T : MlTree
    {
        var trees = ensemble.Trees.Select(Convert).ToList();
        var factor = -slope * scoreScale;
        var result = new TreeEnsemble(trees, [.. ensemble.TreeWeights.Select(w => w * factor)], -slope * scoreScale * ensemble.Bias - offset, featureCount);
        return new(result, CountCovers(result, trainX, weights));
    }

    private static RegressionTree Convert<T>(T t, int index) where T : MlTree
    {
        var n = t.NumberOfNodes;
        if (t.CategoricalSplitFlags.Any(c => c))
            throw new InvalidDataException($"Tree {index} uses a categorical split; features must be one-hot numeric columns.");
        return new RegressionTree(
            [.. t.NumericalSplitFeatureIndexes],
            [.. t.NumericalSplitThresholds.Select(v => (double)v)],
            [.. t.LeftChild],
            [.. t.RightChild],
            // ML.NET compares NaN as is: NaN <= t is false, so missing values go right.
            Enumerable.Repeat(MissingRouting.Compare, n).ToArray(),
            new bool[n],
            new double[n],
            [.. t.LeafValues],
            new double[t.NumberOfLeaves]);
    }

    /// <summary>
    /// One pass over the training rows, in parallel over fixed blocks: each row is routed once through every
    /// tree, adding its weight to the leaf it reaches and its leaf value to its log-odds (summed in the order
    /// <see cref="TreeEnsemble.Predict"/> uses, so the scores are the model's to the last bit). Block sums are
    /// added up in block order; an internal node's cover is the sum of its children's.
    /// </summary>
    private static double[] CountCovers(TreeEnsemble ensemble, IReadOnlyList<double[]> trainX, IReadOnlyList<double> weights)
    {
        var trees = ensemble.Trees;
        var logOdds = new double[trainX.Count];
        var blocks = (trainX.Count + BlockRows - 1) / BlockRows;
        var blockCovers = new double[blocks][][];
        Parallel.For(0, blocks, b =>
        {
            var covers = trees.Select(t => new double[t.LeafCover.Length]).ToArray();
            for (var r = b * BlockRows; r < Math.Min(trainX.Count, (b + 1) * BlockRows); r++)
            {
                var x = trainX[r];
                var w = weights[r];
                var sum = ensemble.Bias;
                for (var t = 0; t < trees.Count; t++)
                {
                    var leaf = LeafOf(trees[t], x);
                    covers[t][leaf] += w;
                    sum += ensemble.TreeWeights[t] * trees[t].LeafValue[leaf];
                }
                logOdds[r] = sum;
            }
            blockCovers[b] = covers;
        });
        for (var t = 0; t < trees.Count; t++)
        {
            var tree = trees[t];
            foreach (var covers in blockCovers)
                for (var l = 0; l < tree.LeafCover.Length; l++) tree.LeafCover[l] += covers[t][l];
            // A leaf no training row reaches (possible for bagged forests) would make TreeSHAP divide by
            // zero; give it a negligible cover.
            var tiny = 1e-9 * Math.Max(1.0, tree.LeafCover.Sum());
            for (var l = 0; l < tree.LeafCover.Length; l++) if (tree.LeafCover[l] <= 0) tree.LeafCover[l] = tiny;
            if (tree.InternalCount > 0) Recount(tree, 0);
        }
        return logOdds;
    }

    /// <summary>
    /// <see cref="RegressionTree.LeafOf"/> for a converted ML.NET tree, whose splits all compare as is
    /// (<see cref="MissingRouting.Compare"/>: go left when value &lt;= threshold, NaN goes right).
    /// </summary>
    private static int LeafOf(RegressionTree tree, double[] x)
    {
        if (tree.InternalCount == 0) return 0;
        var (feature, threshold, left, right) = (tree.SplitFeature, tree.Threshold, tree.Left, tree.Right);
        var node = 0;
        while (node >= 0) node = x[feature[node]] <= threshold[node] ? left[node] : right[node];
        return ~node;
    }

    private static double Recount(RegressionTree tree, int node) =>
        node < 0 ? tree.LeafCover[~node] : tree.NodeCover[node] = Recount(tree, tree.Left[node]) + Recount(tree, tree.Right[node]);
}
