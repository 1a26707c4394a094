using System.Text.Json.Serialization;

namespace Triage.Scoring.Linear;

/// <summary>
/// A linear model in log-odds (weights and bias already scaled by the Platt calibrator) with the
/// training means of its inputs. Exact Shapley values of a linear model with independent features:
/// phi_i = w_i (x_i − E[x_i]) (Lundberg &amp; Lee 2017, NeurIPS, Corollary 1); base = w·E[x] + b.
/// </summary>
public sealed record LinearExplainer(double[] Weights, double Bias, double[] Means)
{
    [JsonIgnore] public int FeatureCount => Weights.Length;

    [JsonIgnore] public double ExpectedValue
    {
        get
        {
            var sum = Bias;
            for (var i = 0; i < Weights.Length; i++) sum += Weights[i] * Means[i];
            return sum;
        }
    }

    public double Predict(ReadOnlySpan<double> x)
    {
        var sum = Bias;
        for (var i = 0; i < Weights.Length; i++) sum += Weights[i] * x[i];
        return sum;
    }

    /// <summary>Writes phi and returns the log-odds.</summary>
    public double Explain(ReadOnlySpan<double> x, Span<double> phi)
    {
        for (var i = 0; i < Weights.Length; i++) phi[i] = Weights[i] * (x[i] - Means[i]);
        return Predict(x);
    }
}
