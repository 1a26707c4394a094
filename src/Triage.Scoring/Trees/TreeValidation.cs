namespace Triage.Scoring.Trees;

/// <summary>
/// Rejects ensembles that are not well-formed binary trees with usable covers (what exact TreeSHAP
/// needs), naming the tree and node.
/// </summary>
internal static class TreeValidation
{
    public static void Check(TreeEnsemble ensemble)
    {
        ArgumentNullException.ThrowIfNull(ensemble);
        if (ensemble.FeatureCount < 0) Fail($"FeatureCount is {ensemble.FeatureCount}; it must be >= 0.");
        if (ensemble.TreeWeights.Length != ensemble.Trees.Count)
            Fail($"{ensemble.Trees.Count} trees but {ensemble.TreeWeights.Length} tree weights.");
        if (!double.IsFinite(ensemble.Bias)) Fail($"Bias is {ensemble.Bias}.");
        for (var t = 0; t < ensemble.Trees.Count; t++)
        {
            if (!double.IsFinite(ensemble.TreeWeights[t])) Fail($"Tree {t}: weight is {ensemble.TreeWeights[t]}.");
            CheckTree(t, ensemble.Trees[t], ensemble.FeatureCount);
        }
    }

    private static void CheckTree(int t, RegressionTree tree, int featureCount)
    {
        var n = tree.InternalCount;
        if (tree.Threshold.Length != n || tree.Left.Length != n || tree.Right.Length != n
            || tree.Missing.Length != n || tree.DefaultLeft.Length != n || tree.NodeCover.Length != n)
            Fail($"Tree {t}: node arrays differ in length (split features: {n}).");
        if (tree.LeafValue.Length != n + 1 || tree.LeafCover.Length != n + 1)
            Fail($"Tree {t}: a binary tree with {n} internal nodes needs {n + 1} leaf values and leaf covers.");
        for (var leaf = 0; leaf <= n; leaf++)
        {
            if (!double.IsFinite(tree.LeafValue[leaf])) Fail($"Tree {t} leaf {leaf}: value is {tree.LeafValue[leaf]}.");
            if (!(tree.LeafCover[leaf] >= 0) || double.IsInfinity(tree.LeafCover[leaf]))
                Fail($"Tree {t} leaf {leaf}: cover is {tree.LeafCover[leaf]}; covers must be finite and >= 0.");
        }
        if (n == 0) return;
        var seenNode = new bool[n];
        var seenLeaf = new bool[n + 1];
        var stack = new Stack<int>([0]);
        seenNode[0] = true;
        while (stack.Count > 0)
        {
            var node = stack.Pop();
            if ((uint)tree.SplitFeature[node] >= (uint)featureCount)
                Fail($"Tree {t} node {node}: split feature {tree.SplitFeature[node]} is outside 0..{featureCount - 1}.");
            if (double.IsNaN(tree.Threshold[node])) Fail($"Tree {t} node {node}: threshold is NaN.");
            // Path-dependent TreeSHAP divides by the node cover: a node no training row reached has no
            // conditional expectation.
            if (!(tree.NodeCover[node] > 0) || double.IsInfinity(tree.NodeCover[node]))
                Fail($"Tree {t} node {node}: cover is {tree.NodeCover[node]}; internal nodes need a finite cover > 0.");
            foreach (var child in (ReadOnlySpan<int>)[tree.Left[node], tree.Right[node]])
            {
                if (child >= 0)
                {
                    if (child >= n) Fail($"Tree {t} node {node}: child {child} is outside 0..{n - 1}.");
                    if (seenNode[child]) Fail($"Tree {t} node {node}: node {child} is reached twice.");
                    seenNode[child] = true;
                    stack.Push(child);
                }
                else
                {
                    if (~child > n) Fail($"Tree {t} node {node}: leaf {~child} is outside 0..{n}.");
                    if (seenLeaf[~child]) Fail($"Tree {t} node {node}: leaf {~child} is reached twice.");
                    seenLeaf[~child] = true;
                }
            }
        }
        var unreached = Array.IndexOf(seenLeaf, false);
        if (unreached >= 0) Fail($"Tree {t}: leaf {unreached} is not reachable from the root.");
    }

    private static void Fail(string message) => throw new ArgumentException(message, "ensemble");
}
