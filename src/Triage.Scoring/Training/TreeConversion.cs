using Triage.Scoring.Trees;
using MlTree = Microsoft.ML.Trainers.FastTree.RegressionTreeBase;

namespace Triage.Scoring.Training;

/// <summary>
/// Copies an ML.NET tree ensemble into our flat trees, scaled so the output is log-odds:
/// ML.NET's Platt probability is 1/(1+exp(Slope·Score+Offset)), so log-odds = −Slope·Score − Offset.
/// Node covers are not public in ML.NET; they are counted by routing the (weighted) training rows.
/// </summary>
internal static class TreeConversion
{
    public static TreeEnsemble ToLogOdds<T>(Microsoft.ML.Trainers.FastTree.TreeEnsemble<T> ensemble, double scoreScale, double slope, double offset,
        IReadOnlyList<double[]> trainX, IReadOnlyList<double> weights, int featureCount) where T : MlTree
    {
        // Trees are independent: covers are counted for several at once.
        List<RegressionTree> trees;
        try { trees = ensemble.Trees.Select((t, i) => (t, i)).AsParallel().AsOrdered().Select(p => Convert(p.t, p.i, trainX, weights)).ToList(); }
        catch (AggregateException e) when (e.InnerExceptions.Count == 1)
        {
            System.Runtime.ExceptionServices.ExceptionDispatchInfo.Throw(e.InnerExceptions[0]);
            throw;
        }
        var factor = -slope * scoreScale;
        return new TreeEnsemble(trees, [.. ensemble.TreeWeights.Select(w => w * factor)],
            -slope * scoreScale * ensemble.Bias - offset, featureCount);
    }

    private static RegressionTree Convert(MlTree t, int index, IReadOnlyList<double[]> trainX, IReadOnlyList<double> weights)
    {
        var n = t.NumberOfNodes;
        if (t.CategoricalSplitFlags.Any(c => c))
            throw new InvalidDataException($"Tree {index} uses a categorical split; features must be one-hot numeric columns.");
        var tree = new RegressionTree(
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
        CountCovers(tree, trainX, weights);
        return tree;
    }

    private static void CountCovers(RegressionTree tree, IReadOnlyList<double[]> trainX, IReadOnlyList<double> weights)
    {
        for (var r = 0; r < trainX.Count; r++)
        {
            var x = trainX[r];
            var node = 0;
            if (tree.InternalCount > 0)
                while (node >= 0)
                {
                    tree.NodeCover[node] += weights[r];
                    node = tree.GoesLeft(node, x[tree.SplitFeature[node]]) ? tree.Left[node] : tree.Right[node];
                }
            tree.LeafCover[tree.InternalCount > 0 ? ~node : 0] += weights[r];
        }
        // A leaf no training row reaches (possible for bagged forests) would make TreeSHAP divide by
        // zero; give it a negligible cover and keep every parent equal to the sum of its children.
        var tiny = 1e-9 * Math.Max(1.0, tree.LeafCover.Sum());
        if (!tree.LeafCover.Any(c => c <= 0)) return;
        for (var l = 0; l < tree.LeafCover.Length; l++) if (tree.LeafCover[l] <= 0) tree.LeafCover[l] = tiny;
        if (tree.InternalCount > 0) Recount(tree, 0);
    }

    private static double Recount(RegressionTree tree, int node) =>
        node < 0 ? tree.LeafCover[~node] : tree.NodeCover[node] = Recount(tree, tree.Left[node]) + Recount(tree, tree.Right[node]);
}
