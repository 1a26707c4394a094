namespace Triage.Scoring.Explaining;

/// <summary>
/// One feature's condition on a root-to-leaf path, with every split on that feature along the path
/// merged into one: the row satisfies it when it would take the path's branch at each of those splits.
/// </summary>
internal struct PathElement
{
    /// <summary>Values must be greater than this (NaN: no lower bound, so -∞ still passes).</summary>
    public double Lower;

    /// <summary>Values must be at most this.</summary>
    public double Upper;

    /// <summary>Product of the cover ratios (child / node) of this feature's splits on the path.</summary>
    public double ZeroFraction;

    public int Feature;

    /// <summary>NaN and 0.0 can be routed by a rule of their own (missing-value routing), so their answer is stored.</summary>
    public bool NaNSatisfies;

    public bool ZeroSatisfies;

    public readonly bool IsSatisfiedBy(double value) =>
        double.IsNaN(value) ? NaNSatisfies
        : value == 0.0 ? ZeroSatisfies
        : !(value <= Lower) && value <= Upper;
}
