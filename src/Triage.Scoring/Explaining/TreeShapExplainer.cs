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

            var scale = v * z0;
            ref var w = ref Unsafe.Add(ref weights, (end - start) * _stride);
            var sum = m switch
            {
                // Few satisfied conditions are the common case: closed forms avoid short loops that mispredict.
                0 => w,
                1 => One(ref phis, ref onesZero, ref onesFeature, ref w, scale),
                2 => Two(ref phis, ref onesZero, ref onesFeature, ref w, scale),
                3 => Three(ref phis, ref onesZero, ref onesFeature, ref w, scale),
                _ => Many(ref phis, ref onesZero, ref onesFeature, ref w, ref g, m, scale),
            };

            // A failed condition i has o = 0: its (0 − z_i) · G/z_i weighted is the same for all of them.
            var share = -scale * sum;
            for (var i = 0; i < nz; i++) Unsafe.Add(ref phis, Unsafe.Add(ref zerosFeature, i)) += share;
        }
        return output;
    }

    // Each helper adds scale · (1 − z_i) · Σ_k q_k w_k to phi for every satisfied condition i, where
    // Q = G / (z_i + t) and G(t) = Π over satisfied conditions (z + t), and returns Σ_k g_k w_k.

    private static double One(ref double phi, ref double z, ref int f, ref double w, double scale)
    {
        var a = z;
        Unsafe.Add(ref phi, f) += scale * (1 - a) * w;
        return a * w + Unsafe.Add(ref w, 1);
    }

    private static double Two(ref double phi, ref double z, ref int f, ref double w, double scale)
    {
        double a = z, b = Unsafe.Add(ref z, 1), w0 = w, w1 = Unsafe.Add(ref w, 1);
        Unsafe.Add(ref phi, f) += scale * (1 - a) * (b * w0 + w1);
        Unsafe.Add(ref phi, Unsafe.Add(ref f, 1)) += scale * (1 - b) * (a * w0 + w1);
        return a * b * w0 + (a + b) * w1 + Unsafe.Add(ref w, 2);
    }

    private static double Three(ref double phi, ref double z, ref int f, ref double w, double scale)
    {
        double a = z, b = Unsafe.Add(ref z, 1), c = Unsafe.Add(ref z, 2);
        double w0 = w, w1 = Unsafe.Add(ref w, 1), w2 = Unsafe.Add(ref w, 2);
        Unsafe.Add(ref phi, f) += scale * (1 - a) * (b * c * w0 + (b + c) * w1 + w2);
        Unsafe.Add(ref phi, Unsafe.Add(ref f, 1)) += scale * (1 - b) * (a * c * w0 + (a + c) * w1 + w2);
        Unsafe.Add(ref phi, Unsafe.Add(ref f, 2)) += scale * (1 - c) * (a * b * w0 + (a + b) * w1 + w2);
        return a * b * c * w0 + (a * b + a * c + b * c) * w1 + (a + b + c) * w2 + Unsafe.Add(ref w, 3);
    }

    private static double Many(ref double phi, ref double onesZero, ref int onesFeature, ref double w, ref double g, int m, double scale)
    {
        g = 1.0;
        for (var k = 0; k < m; k++)
        {
            var z = Unsafe.Add(ref onesZero, k);
            Unsafe.Add(ref g, k + 1) = Unsafe.Add(ref g, k);
            for (var j = k; j > 0; j--) Unsafe.Add(ref g, j) = Unsafe.Add(ref g, j) * z + Unsafe.Add(ref g, j - 1);
            g *= z;
        }
        for (var i = 0; i < m; i++)
        {
            // Synthetic division from the top: errors shrink by z_i <= 1 at each step.
            var z = Unsafe.Add(ref onesZero, i);
            var q = Unsafe.Add(ref g, m);
            var acc = q * Unsafe.Add(ref w, m - 1);
            for (var k = m - 1; k > 0; k--)
            {
                q = Unsafe.Add(ref g, k) - z * q;
                acc += q * Unsafe.Add(ref w, k - 1);
            }
            Unsafe.Add(ref phi, Unsafe.Add(ref onesFeature, i)) += scale * (1.0 - z) * acc;
        }
        var sum = 0.0;
        for (var k = 0; k <= m; k++) sum += Unsafe.Add(ref g, k) * Unsafe.Add(ref w, k);
        return sum;
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
