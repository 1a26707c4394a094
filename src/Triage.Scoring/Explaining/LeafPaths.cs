using Triage.Scoring.Trees;

namespace Triage.Scoring.Explaining;

/// <summary>
/// Every leaf of an ensemble as a flat list of merged path conditions (the path formulation of
/// Mitchell et al. 2022, GPUTreeShap). Leaves of a tree with weight or value 0 are dropped: they add
/// nothing to any attribution or output.
/// </summary>
internal sealed class LeafPaths
{
    public required PathElement[] Elements { get; init; }

    /// <summary>Leaf l owns Elements[LeafStart[l] .. LeafStart[l + 1]).</summary>
    public required int[] LeafStart { get; init; }

    /// <summary>Tree weight × leaf value.</summary>
    public required double[] LeafValue { get; init; }

    /// <summary>Bias plus the single-leaf trees: part of every output, never attributed.</summary>
    public required double Constant { get; init; }

    /// <summary>The value with no feature known: Σ leaf value × product of zero fractions on its path.</summary>
    public required double ExpectedValue { get; init; }

    public required int MaxLength { get; init; }

    public int LeafCount => LeafValue.Length;

    public static LeafPaths Build(TreeEnsemble ensemble)
    {
        TreeValidation.Check(ensemble);
        var builder = new Builder();
        var constant = ensemble.Bias;
        for (var t = 0; t < ensemble.Trees.Count; t++)
        {
            var tree = ensemble.Trees[t];
            var weight = ensemble.TreeWeights[t];
            if (tree.InternalCount == 0) constant += weight * tree.LeafValue[0];
            else if (weight != 0.0) builder.Walk(tree, weight, 0);
        }
        return new LeafPaths
        {
            Elements = [.. builder.Elements],
            LeafStart = [.. builder.LeafStart],
            LeafValue = [.. builder.LeafValue],
            Constant = constant,
            ExpectedValue = constant + builder.Expected,
            MaxLength = builder.MaxLength,
        };
    }

    private sealed class Builder
    {
        private readonly List<PathElement> _path = [];
        public List<PathElement> Elements { get; } = [];
        public List<int> LeafStart { get; } = [0];
        public List<double> LeafValue { get; } = [];
        public double Expected { get; private set; }
        public int MaxLength { get; private set; }

        public void Walk(RegressionTree tree, double weight, int node)
        {
            if (node < 0)
            {
                AddLeaf(weight * tree.LeafValue[~node]);
                return;
            }
            Descend(tree, weight, node, goLeft: true);
            Descend(tree, weight, node, goLeft: false);
        }

        private void Descend(RegressionTree tree, double weight, int node, bool goLeft)
        {
            var child = goLeft ? tree.Left[node] : tree.Right[node];
            var childCover = child < 0 ? tree.LeafCover[~child] : tree.NodeCover[child];
            var feature = tree.SplitFeature[node];
            var threshold = tree.Threshold[node];
            var at = _path.FindIndex(e => e.Feature == feature);
            var element = at >= 0
                ? _path[at]
                : new PathElement { Lower = double.NaN, Upper = double.PositiveInfinity, ZeroFraction = 1.0, Feature = feature, Special = PathElement.NaNBit | PathElement.ZeroBit };
            var before = element;
            // Away from NaN and 0 every routing rule is the plain "value <= threshold" test.
            if (goLeft) element.Upper = Math.Min(element.Upper, threshold);
            else element.Lower = double.IsNaN(element.Lower) ? threshold : Math.Max(element.Lower, threshold);
            if (tree.GoesLeft(node, double.NaN) != goLeft) element.Special &= ~PathElement.NaNBit;
            if (tree.GoesLeft(node, 0.0) != goLeft) element.Special &= ~PathElement.ZeroBit;
            element.ZeroFraction *= childCover / tree.NodeCover[node];
            if (at >= 0) _path[at] = element;
            else _path.Add(element);
            Walk(tree, weight, child);
            if (at >= 0) _path[at] = before;
            else _path.RemoveAt(_path.Count - 1);
        }

        private void AddLeaf(double value)
        {
            var reach = 1.0;
            foreach (var e in _path) reach *= e.ZeroFraction;
            Expected += value * reach;
            if (value == 0.0) return;
            Elements.AddRange(_path);
            LeafStart.Add(Elements.Count);
            LeafValue.Add(value);
            MaxLength = Math.Max(MaxLength, _path.Count);
        }
    }
}
