using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using Triage.Scoring.Trees;

namespace Triage.Scoring.Explaining;

/// <summary>
/// Exact path-dependent TreeSHAP (Lundberg, Erion &amp; Lee 2018, arXiv:1802.03888; Lundberg et al.
/// 2020, Nature Machine Intelligence 2:56–67) for a <see cref="TreeEnsemble"/>. Built once per model;
/// immutable and safe to share between threads.
/// </summary>
/// <remarks>
/// Each leaf is a path of merged feature conditions. For a row, a condition holds (one fraction 1) or
/// not (0). The leaf's Shapley weights are then the coefficients of G(t) = Π_j (z_j + o_j·t) over its
/// path elements (z = zero fraction): the conditions that fail only scale G and share one sum, so the
/// work per leaf is quadratic in the number of conditions the row satisfies, not cubic in the path
/// length (compare Yang 2021, Fast TreeSHAP, arXiv:2109.09847).
/// </remarks>
public sealed class TreeShapExplainer
{
    private readonly LeafPaths _paths;

    /// <summary>Shapley weight |S|!(d−1−|S|)!/d! at [d · _stride + |S|].</summary>
    private readonly double[] _weights;

    private readonly int _stride;

    [ThreadStatic] private static Scratch? t_scratch;

    public TreeShapExplainer(TreeEnsemble ensemble)
    {
        _paths = LeafPaths.Build(ensemble);
        FeatureCount = ensemble.FeatureCount;
        _stride = _paths.MaxLength + 1;
        _weights = new double[_stride * _stride];
        for (var d = 1; d <= _paths.MaxLength; d++)
        {
            var w = 1.0 / d;
            for (var k = 0; k < d; k++)
            {
                _weights[d * _stride + k] = w;
                w *= (k + 1.0) / (d - k - 1.0);
            }
        }
    }

    /// <summary>The model's output when no feature is known: E[f] under the tree covers.</summary>
    public double ExpectedValue => _paths.ExpectedValue;

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

        var scratch = Scratch.For(_paths.MaxLength, FeatureCount, ref t_scratch);
        var kinds = scratch.Kinds;
        for (var f = 0; f < FeatureCount; f++) kinds[f] = PathElement.KindOf(x[f]);

        // Refs instead of indexers: the loops below are the hot path and their bounds are known.
        ref var xs = ref MemoryMarshal.GetReference(x);
        ref var phis = ref MemoryMarshal.GetReference(phi);
        ref var kind = ref MemoryMarshal.GetArrayDataReference(kinds);
        ref var onesZero = ref MemoryMarshal.GetArrayDataReference(scratch.OnesZero);
        ref var onesFeature = ref MemoryMarshal.GetArrayDataReference(scratch.OnesFeature);
        ref var zerosZero = ref MemoryMarshal.GetArrayDataReference(scratch.ZerosZero);
        ref var zerosFeature = ref MemoryMarshal.GetArrayDataReference(scratch.ZerosFeature);
        ref var g = ref MemoryMarshal.GetArrayDataReference(scratch.Poly);
        ref var elements = ref MemoryMarshal.GetArrayDataReference(_paths.Elements);
        ref var starts = ref MemoryMarshal.GetArrayDataReference(_paths.LeafStart);
        ref var values = ref MemoryMarshal.GetArrayDataReference(_paths.LeafValue);
        ref var weights = ref MemoryMarshal.GetArrayDataReference(_weights);
        var output = _paths.Constant;
        var leaves = _paths.LeafCount;

        for (var leaf = 0; leaf < leaves; leaf++)
        {
            int start = Unsafe.Add(ref starts, leaf), end = Unsafe.Add(ref starts, leaf + 1);
            int m = 0, nz = 0;
            for (var e = start; e < end; e++)
            {
                ref readonly var el = ref Unsafe.Add(ref elements, e);
                var one = el.Satisfied(Unsafe.Add(ref xs, el.Feature), Unsafe.Add(ref kind, el.Feature));
                // Write to both lists and advance one: no branch on the (unpredictable) outcome.
                Unsafe.Add(ref onesZero, m) = el.ZeroFraction;
                Unsafe.Add(ref onesFeature, m) = el.Feature;
                Unsafe.Add(ref zerosZero, nz) = el.ZeroFraction;
                Unsafe.Add(ref zerosFeature, nz) = el.Feature;
                m += one;
                nz += one ^ 1;
            }
            var v = Unsafe.Add(ref values, leaf);
            if (nz == 0) output += v; // every condition holds: the row lands in this leaf
            var z0 = 1.0;
            for (var i = 0; i < nz; i++) z0 *= Unsafe.Add(ref zerosZero, i);
            if (z0 == 0.0) continue;  // G ≡ 0: the leaf contributes to no attribution

            // G(t) = z0 · Π over satisfied conditions (z + t), coefficients g[0..m].
            g = z0;
            for (var k = 0; k < m; k++)
            {
                var z = Unsafe.Add(ref onesZero, k);
                Unsafe.Add(ref g, k + 1) = Unsafe.Add(ref g, k);
                for (var j = k; j > 0; j--) Unsafe.Add(ref g, j) = Unsafe.Add(ref g, j) * z + Unsafe.Add(ref g, j - 1);
                g *= z;
            }
            ref var w = ref Unsafe.Add(ref weights, (end - start) * _stride);

            // A failed condition i has o = 0: G / z_i weighted, times (0 − z_i), is the same for all of them.
            if (nz > 0)
            {
                var sum = 0.0;
                for (var k = 0; k <= m; k++) sum += Unsafe.Add(ref g, k) * Unsafe.Add(ref w, k);
                var share = -v * sum;
                for (var i = 0; i < nz; i++) Unsafe.Add(ref phis, Unsafe.Add(ref zerosFeature, i)) += share;
            }

            // A satisfied condition i: divide G by (z_i + t) from the top (stable for z_i <= 1), weight, times (1 − z_i).
            for (var i = 0; i < m; i++)
            {
                var z = Unsafe.Add(ref onesZero, i);
                var q = Unsafe.Add(ref g, m);
                var acc = q * Unsafe.Add(ref w, m - 1);
                for (var k = m - 1; k > 0; k--)
                {
                    q = Unsafe.Add(ref g, k) - z * q;
                    acc += q * Unsafe.Add(ref w, k - 1);
                }
                Unsafe.Add(ref phis, Unsafe.Add(ref onesFeature, i)) += v * (1.0 - z) * acc;
            }
        }
        return output;
    }

    /// <summary>Per-thread buffers, so rows allocate nothing.</summary>
    private sealed class Scratch(int capacity, int features)
    {
        public double[] OnesZero { get; } = new double[capacity + 1];
        public int[] OnesFeature { get; } = new int[capacity + 1];
        public double[] ZerosZero { get; } = new double[capacity + 1];
        public int[] ZerosFeature { get; } = new int[capacity + 1];
        public double[] Poly { get; } = new double[capacity + 1];
        public int[] Kinds { get; } = new int[features];

        public static Scratch For(int capacity, int features, ref Scratch? slot)
        {
            if (slot is null || slot.Poly.Length <= capacity || slot.Kinds.Length < features) slot = new Scratch(capacity, features);
            return slot;
        }
    }
}
