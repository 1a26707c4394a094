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

    /// <summary>
    /// NaN and 0.0 can be routed by a rule of their own (missing-value routing), so their answers are
    /// stored: bit 1 = NaN satisfies the condition, bit 2 = 0.0 does.
    /// </summary>
    public int Special;

    public const int NaNBit = 2, ZeroBit = 4;

    /// <summary>How a value is tested: 0 against the interval, 1 as NaN, 2 as zero (the bit to read from Special).</summary>
    public static int KindOf(double value) => double.IsNaN(value) ? 1 : value == 0.0 ? 2 : 0;

    /// <summary>1 when a value of the given kind satisfies the condition, else 0; free of data-dependent branches.</summary>
    public readonly int Satisfied(double value, int kind)
    {
        var inRange = (!(value <= Lower) & (value <= Upper)) ? 1 : 0;
        return ((inRange | Special) >> kind) & 1;
    }
}
