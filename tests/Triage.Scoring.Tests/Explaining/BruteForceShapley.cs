using Triage.Scoring.Trees;

namespace Triage.Scoring.Tests.Explaining;

/// <summary>
/// Reference attributions straight from the definitions, exponential in the feature count:
/// the Shapley value (Shapley 1953) over all feature subsets, with the path-dependent conditional
/// expectation EXPVALUE of Lundberg, Erion &amp; Lee 2018 (arXiv:1802.03888, Algorithm 1) as the value
/// of a subset.
/// </summary>
internal static class BruteForceShapley
{
    public static double[] Attributions(TreeEnsemble ensemble, double[] x)
    {
        var m = ensemble.FeatureCount;
        var value = new double[1 << m];
        for (var s = 0; s < value.Length; s++) value[s] = Value(ensemble, x, s);
        var phi = new double[m];
        for (var i = 0; i < m; i++)
        {
            for (var s = 0; s < value.Length; s++)
            {
                if ((s & (1 << i)) != 0) continue;
                var size = int.PopCount(s);
                // |S|! (M − |S| − 1)! / M!
                var weight = Factorial(size) * Factorial(m - size - 1) / Factorial(m);
                phi[i] += weight * (value[s | (1 << i)] - value[s]);
            }
        }
        return phi;
    }

    /// <summary>E[f(x) | x_S] as the trees' covers define it; subset as a bit mask over features.</summary>
    public static double Value(TreeEnsemble ensemble, double[] x, int subset)
    {
        var sum = ensemble.Bias;
        for (var t = 0; t < ensemble.Trees.Count; t++)
        {
            var tree = ensemble.Trees[t];
            sum += ensemble.TreeWeights[t] * (tree.InternalCount == 0 ? tree.LeafValue[0] : ExpValue(tree, 0, x, subset));
        }
        return sum;
    }

    // Algorithm 1 of Lundberg, Erion & Lee 2018: follow x where the split feature is known, else
    // average both children weighted by cover r_child / r_node.
    private static double ExpValue(RegressionTree tree, int node, double[] x, int subset)
    {
        if (node < 0) return tree.LeafValue[~node];
        var feature = tree.SplitFeature[node];
        if ((subset & (1 << feature)) != 0)
            return ExpValue(tree, tree.GoesLeft(node, x[feature]) ? tree.Left[node] : tree.Right[node], x, subset);
        var left = tree.Left[node];
        var right = tree.Right[node];
        return (Cover(tree, left) * ExpValue(tree, left, x, subset) + Cover(tree, right) * ExpValue(tree, right, x, subset))
            / tree.NodeCover[node];
    }

    private static double Cover(RegressionTree tree, int child) => child < 0 ? tree.LeafCover[~child] : tree.NodeCover[child];

    private static double Factorial(int n)
    {
        var f = 1.0;
        for (var i = 2; i <= n; i++) f *= i;
        return f;
    }
}
