namespace Triage.Scoring.Trees;

/// <summary>How a split treats a missing (NaN) feature value.</summary>
public enum MissingRouting
{
    /// <summary>NaN is compared as is: <c>NaN &lt;= t</c> is false, so it goes right (ML.NET's trees).</summary>
    Compare,
    /// <summary>NaN is read as 0.0 before comparing (LightGBM missing type None).</summary>
    AsZero,
    /// <summary>NaN goes the default way (LightGBM missing type NaN).</summary>
    DefaultWay,
    /// <summary>NaN and 0.0 both go the default way (LightGBM missing type Zero).</summary>
    ZeroDefaultWay,
}

/// <summary>
/// One regression tree in flat arrays. Internal nodes are 0..n-1; a child index c &gt;= 0 is an
/// internal node, c &lt; 0 is leaf ~c. A row goes left when its value &lt;= Threshold (after the
/// node's missing-value rule). Covers are the (weighted) training rows that reached each node,
/// which path-dependent TreeSHAP needs as its conditional expectation.
/// </summary>
public sealed record RegressionTree(
    int[] SplitFeature,
    double[] Threshold,
    int[] Left,
    int[] Right,
    MissingRouting[] Missing,
    bool[] DefaultLeft,
    double[] NodeCover,
    double[] LeafValue,
    double[] LeafCover)
{
    public int InternalCount => SplitFeature.Length;

    public bool GoesLeft(int node, double value)
    {
        switch (Missing[node])
        {
            case MissingRouting.AsZero when double.IsNaN(value):
                value = 0.0;
                break;
            case MissingRouting.DefaultWay when double.IsNaN(value):
            case MissingRouting.ZeroDefaultWay when double.IsNaN(value) || value == 0.0:
                return DefaultLeft[node];
        }
        return value <= Threshold[node];
    }

    public int LeafOf(ReadOnlySpan<double> x)
    {
        if (InternalCount == 0) return 0;
        var node = 0;
        while (node >= 0) node = GoesLeft(node, x[SplitFeature[node]]) ? Left[node] : Right[node];
        return ~node;
    }
}

/// <summary>
/// Output = Bias + Σ TreeWeights[t] · tree_t(x). Producers scale weights and bias so the output is
/// the model's log-odds (FastTree: multiply by −PlattSlope and subtract the offset; FastForest:
/// the averaging weight 1/T times the same calibration slope).
/// </summary>
public sealed record TreeEnsemble(
    IReadOnlyList<RegressionTree> Trees,
    double[] TreeWeights,
    double Bias,
    int FeatureCount)
{
    public double Predict(ReadOnlySpan<double> x)
    {
        var sum = Bias;
        for (var t = 0; t < Trees.Count; t++) sum += TreeWeights[t] * Trees[t].LeafValue[Trees[t].LeafOf(x)];
        return sum;
    }
}
