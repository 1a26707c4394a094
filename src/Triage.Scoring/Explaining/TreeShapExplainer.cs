using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using Triage.Scoring.Trees;

namespace Triage.Scoring.Explaining;

/// <summary>
/// Exact path-dependent TreeSHAP (Lundberg, Erion &amp; Lee 2018, arXiv:1802.03888; Lundberg et al.
/// 2020, Nature Machine Intelligence 2:56–67) for a <see cref="TreeEnsemble"/>. Built once per model;
/// immutable and safe to share between threads.
/// </summary>
/// <remarks>
/// A leaf's path has one merged condition j per feature, with zero fraction z_j and, for a row,
/// o_j = 1 when the row satisfies it, else 0. Its Shapley weights are the Beta integrals
/// |S|!(d−1−|S|)!/d! = ∫₀¹ t^|S| (1−t)^(d−1−|S|) dt, so its share of φ_i is v·(o_i − z_i)·∫₀¹ G(t)/f_i(t) dt
/// with f_j(t) = z_j + (o_j − z_j)·t and G = Π_j f_j — the multilinear-extension form of the Shapley
/// value (Owen 1972, Management Science 18(5):P64–P79). That is linear in v·G, so one depth-first walk
/// per tree sums v·G over the leaves below each edge and divides by the edge's factor once for all of
/// them (the sharing of Yu et al. 2022, Linear TreeShap, arXiv:2209.08192). G has degree at most the
/// number of features on a path, so Gauss–Legendre quadrature with half that many nodes integrates
/// exactly; polynomials are kept as their values at those nodes, one vector lane per node.
/// </remarks>
public sealed class TreeShapExplainer
{
    /// <summary>Quadrature nodes per vector.</summary>
    private const int Lanes = 8;

    private readonly TreeEdges _edges;
    private readonly Vector512<double>[] _nodes;
    private readonly Vector512<double>[] _quadratureWeights;

    [ThreadStatic] private static Walk? t_walk;

    public TreeShapExplainer(TreeEnsemble ensemble)
    {
        _edges = TreeEdges.Build(ensemble);
        FeatureCount = ensemble.FeatureCount;
        // n = Lanes · chunks nodes are exact up to degree 2n − 1 >= MaxFeatures − 1.
        var chunks = Math.Max(1, (_edges.MaxFeatures + 2 * Lanes - 1) / (2 * Lanes));
        var (nodes, weights) = GaussLegendre.OnUnitInterval(Lanes * chunks);
        _nodes = new Vector512<double>[chunks];
        _quadratureWeights = new Vector512<double>[chunks];
        for (var c = 0; c < chunks; c++)
        {
            _nodes[c] = Vector512.Create(nodes.AsSpan(c * Lanes, Lanes));
            _quadratureWeights[c] = Vector512.Create(weights.AsSpan(c * Lanes, Lanes));
        }
    }

    /// <summary>The model's output when no feature is known: E[f] under the tree covers.</summary>
    public double ExpectedValue => _edges.ExpectedValue;

    public int FeatureCount { get; }

    /// <summary>
    /// Writes one attribution per feature into <paramref name="phi"/> (cleared first) and returns the
    /// model output; <see cref="ExpectedValue"/> + Σ phi equals that output. NaN means missing and is
    /// routed by each split's own rule.
    /// </summary>
    public double Explain(ReadOnlySpan<double> x, Span<double> phi)
    {
        if (x.Length < FeatureCount) throw new ArgumentException($"The row has {x.Length} values; the model needs {FeatureCount}.", nameof(x));
        if (phi.Length < FeatureCount) throw new ArgumentException($"phi has room for {phi.Length} values; the model has {FeatureCount} features.", nameof(phi));
        phi = phi[..FeatureCount];
        phi.Clear();

        var walk = Walk.For(_edges, FeatureCount, ref t_walk);
        walk.Start(x[..FeatureCount]);
        var output = _edges.Constant;
        // Lanes are independent: with more nodes than one vector holds, walk once per vector.
        for (var c = 0; c < _nodes.Length; c++)
        {
            walk.Output = 0.0;
            foreach (var root in _edges.Roots) walk.Visit(root, Vector512<double>.One, 1, _nodes[c]);
            if (c == 0) output += walk.Output;
            walk.Finish(phi, _quadratureWeights[c]);
        }
        return output;
    }

    /// <summary>Per-thread state of one row's walk, so rows allocate nothing.</summary>
    private sealed class Walk(int features, int depth)
    {
        private readonly double[] _x = new double[features];
        private readonly int[] _kind = new int[features];
        /// <summary>Per feature: Σ (o − z)·(v·G below the edge)/f over its edges, at each node.</summary>
        private readonly Vector512<double>[] _sums = new Vector512<double>[features];
        /// <summary>Per feature: Σ v·G over the leaves below the nearest edges on it under the current one.</summary>
        private readonly Vector512<double>[] _below = new Vector512<double>[features];
        /// <summary>1 / factor of each edge on the current path, by depth.</summary>
        private readonly Vector512<double>[] _inverses = new Vector512<double>[depth + 1];

        public TreeEdges Model = null!;
        public double Output;

        public static Walk For(TreeEdges edges, int features, ref Walk? slot)
        {
            if (slot is null || slot._x.Length < features || slot._inverses.Length <= edges.MaxDepth) slot = new Walk(features, edges.MaxDepth);
            slot.Model = edges;
            return slot;
        }

        public void Start(ReadOnlySpan<double> x)
        {
            x.CopyTo(_x);
            for (var f = 0; f < x.Length; f++) _kind[f] = PathElement.KindOf(x[f]);
        }

        public void Finish(Span<double> phi, Vector512<double> weights)
        {
            for (var f = 0; f < phi.Length; f++)
            {
                phi[f] += Vector512.Dot(_sums[f], weights);
                _sums[f] = Vector512<double>.Zero;
                _below[f] = Vector512<double>.Zero;
            }
        }

        /// <summary>Walks the subtree under node with G so far; returns Σ v·G over its leaves.</summary>
        public Vector512<double> Visit(int node, Vector512<double> g, int holds, Vector512<double> t)
        {
            ref var edges = ref MemoryMarshal.GetArrayDataReference(Model.Edges);
            ref readonly var first = ref Unsafe.Add(ref edges, 2 * node);
            // Both edges split on one feature, seen at the same depth above (if at all).
            var f = first.Condition.Feature;
            var previous = first.PreviousDepth;
            // A feature seen above: its new merged condition replaces the old factor.
            var rest = previous < 0 ? g : g * Unsafe.Add(ref MemoryMarshal.GetArrayDataReference(_inverses), previous);
            var value = Unsafe.Add(ref MemoryMarshal.GetArrayDataReference(_x), f);
            var kind = Unsafe.Add(ref MemoryMarshal.GetArrayDataReference(_kind), f);
            ref var sameFeature = ref Unsafe.Add(ref MemoryMarshal.GetArrayDataReference(_below), f);
            var shares = Vector512<double>.Zero;
            var total = Take(in first, value, kind, rest, holds, t, ref sameFeature, ref shares)
                + Take(in Unsafe.Add(ref Unsafe.AsRef(in first), 1), value, kind, rest, holds, t, ref sameFeature, ref shares);
            Unsafe.Add(ref MemoryMarshal.GetArrayDataReference(_sums), f) += shares;
            sameFeature += total;
            return total;
        }

        /// <summary>
        /// One edge: returns Σ v·G over the leaves below it and adds (o − z)·(v·G)/f over those of them
        /// it is the deepest edge on its feature for to shares.
        /// </summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private Vector512<double> Take(in Edge e, double value, int kind, Vector512<double> rest, int holds, Vector512<double> t,
            ref Vector512<double> sameFeature, ref Vector512<double> shares)
        {
            var one = e.Condition.Satisfied(value, kind);
            var z = e.Condition.ZeroFraction;
            if (one == 0 && z == 0.0) return Vector512<double>.Zero; // f ≡ 0: nothing below contributes anywhere
            var slope = one - z;
            var factor = Vector512.FusedMultiplyAdd(Vector512.Create(slope), t, Vector512.Create(z));
            if (e.Child < 0)
            {
                var v = e.LeafValue;
                if ((holds & one) != 0) Output += v; // every condition holds: the row lands here
                shares = Vector512.FusedMultiplyAdd(Vector512.Create(slope * v), rest, shares);
                return rest * v * factor;
            }
            var inverse = Reciprocal(factor);
            Unsafe.Add(ref MemoryMarshal.GetArrayDataReference(_inverses), e.Depth) = inverse;
            var saved = sameFeature;
            sameFeature = Vector512<double>.Zero;
            var sub = Visit(e.Child, rest * factor, holds & one, t);
            // Leaves under a deeper edge on the feature are that edge's to count.
            shares = Vector512.FusedMultiplyAdd(Vector512.Create(slope), (sub - sameFeature) * inverse, shares);
            sameFeature = saved;
            return sub;
        }

        /// <summary>1/f to within an ulp or so: the 14-bit estimate and two Newton steps are far cheaper than a divide.</summary>
        private static Vector512<double> Reciprocal(Vector512<double> f)
        {
            if (!Avx512F.IsSupported) return Vector512<double>.One / f;
            var r = Avx512F.Reciprocal14(f);
            r = Vector512.FusedMultiplyAdd(r, Vector512.FusedMultiplyAdd(-f, r, Vector512<double>.One), r);
            return Vector512.FusedMultiplyAdd(r, Vector512.FusedMultiplyAdd(-f, r, Vector512<double>.One), r);
        }
    }
}
