using Triage.Scoring.Trees;

namespace Triage.Scoring.Explaining;

/// <summary>
/// Every edge (node → child) of an ensemble with the merged condition on its feature from the root
/// down to it. Node n owns edges 2n (left) and 2n + 1 (right); nodes of all trees share one numbering.
/// Trees with weight 0 are dropped: they add nothing to any attribution or output.
/// </summary>
internal sealed class TreeEdges
{
    /// <summary>Node n owns Edges[2n] (left) and Edges[2n + 1] (right).</summary>
    public required Edge[] Edges { get; init; }

    /// <summary>Root node of each kept tree.</summary>
    public required int[] Roots { get; init; }

    /// <summary>Bias plus the single-leaf trees: part of every output, never attributed.</summary>
    public required double Constant { get; init; }

    /// <summary>The value with no feature known: Σ leaf value × product of zero fractions on its path.</summary>
    public required double ExpectedValue { get; init; }

    /// <summary>Edges on the longest root-to-leaf path.</summary>
    public required int MaxDepth { get; init; }

    /// <summary>Distinct features on the longest path: the degree of its polynomial.</summary>
    public required int MaxFeatures { get; init; }

    public static TreeEdges Build(TreeEnsemble ensemble)
    {
        TreeValidation.Check(ensemble);
        var builder = new Builder();
        var constant = ensemble.Bias;
        var roots = new List<int>();
        for (var t = 0; t < ensemble.Trees.Count; t++)
        {
            var tree = ensemble.Trees[t];
            var weight = ensemble.TreeWeights[t];
            if (tree.InternalCount == 0) constant += weight * tree.LeafValue[0];
            else if (weight != 0.0) roots.Add(builder.Node(tree, weight, 0, 0, 1.0));
        }
        return new TreeEdges
        {
            Edges = [.. builder.Edges],
            Roots = [.. roots],
            Constant = constant,
            ExpectedValue = constant + builder.Expected,
            MaxDepth = builder.MaxDepth,
            MaxFeatures = builder.MaxFeatures,
        };
    }

    private sealed class Builder
    {
        /// <summary>The merged condition per feature on the current path, with the depth of its last edge.</summary>
        private readonly List<(PathElement Element, int Depth)> _path = [];
        public List<Edge> Edges { get; } = [];
        public double Expected { get; private set; }
        public int MaxDepth { get; private set; }
        public int MaxFeatures { get; private set; }

        /// <summary>Numbers the node, then its subtrees; returns the node's number.</summary>
        public int Node(RegressionTree tree, double weight, int node, int depth, double reach)
        {
            var number = Edges.Count / 2;
            Edges.Add(default);
            Edges.Add(default);
            Edge(tree, weight, node, depth, reach, 2 * number, goLeft: true);
            Edge(tree, weight, node, depth, reach, 2 * number + 1, goLeft: false);
            return number;
        }

        private void Edge(RegressionTree tree, double weight, int node, int depth, double reach, int edge, bool goLeft)
        {
            var child = goLeft ? tree.Left[node] : tree.Right[node];
            var childCover = child < 0 ? tree.LeafCover[~child] : tree.NodeCover[child];
            var feature = tree.SplitFeature[node];
            var threshold = tree.Threshold[node];
            var at = _path.FindIndex(e => e.Element.Feature == feature);
            var before = at >= 0 ? _path[at] : default;
            var element = at >= 0
                ? before.Element
                : new PathElement { Lower = double.NaN, Upper = double.PositiveInfinity, ZeroFraction = 1.0, Feature = feature, Special = PathElement.NaNBit | PathElement.ZeroBit };
            // Away from NaN and 0 every routing rule is the plain "value <= threshold" test.
            if (goLeft) element.Upper = Math.Min(element.Upper, threshold);
            else element.Lower = double.IsNaN(element.Lower) ? threshold : Math.Max(element.Lower, threshold);
            if (tree.GoesLeft(node, double.NaN) != goLeft) element.Special &= ~PathElement.NaNBit;
            if (tree.GoesLeft(node, 0.0) != goLeft) element.Special &= ~PathElement.ZeroBit;
            var ratio = childCover / tree.NodeCover[node];
            element.ZeroFraction *= ratio;
            var result = new Edge { Condition = element, Depth = depth, PreviousDepth = at >= 0 ? before.Depth : -1, Child = -1 };

            if (at >= 0) _path[at] = (element, depth);
            else _path.Add((element, depth));
            MaxFeatures = Math.Max(MaxFeatures, _path.Count);
            if (child < 0)
            {
                result.LeafValue = weight * tree.LeafValue[~child];
                Expected += result.LeafValue * reach * ratio;
                MaxDepth = Math.Max(MaxDepth, depth + 1);
            }
            else result.Child = Node(tree, weight, child, depth + 1, reach * ratio);
            Edges[edge] = result;
            if (at >= 0) _path[at] = before;
            else _path.RemoveAt(_path.Count - 1);
        }
    }
}

/// <summary>One edge: the merged condition down to it, and what it leads to.</summary>
internal struct Edge
{
    /// <summary>The row takes this edge's feature's branch at every split on it from the root down to here.</summary>
    public PathElement Condition;

    /// <summary>Tree weight × leaf value when the child is a leaf.</summary>
    public double LeafValue;

    /// <summary>The child node, or −1 when the child is a leaf.</summary>
    public int Child;

    /// <summary>Depth (0 = edges out of the root) of this edge.</summary>
    public int Depth;

    /// <summary>Depth of the nearest edge above on the same feature, or −1.</summary>
    public int PreviousDepth;
}
