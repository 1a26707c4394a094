using Triage.Scoring.Drift;

namespace Triage.Scoring.Tests.Drift;

/// <summary>PSI = Σ (actual − expected) · ln(actual / expected), computed by hand below (values to 8 places, ln from a calculator).</summary>
public sealed class PsiTests
{
    [Fact]
    public void Matches_a_hand_computed_example_with_an_empty_training_bin()
    {
        // Bin 1: (0.25 − 0.20) · ln(0.25 / 0.20) = 0.05 · 0.22314355 = 0.01115718
        // Bin 2: (0.25 − 0.30) · ln(0.25 / 0.30) = −0.05 · −0.18232156 = 0.00911608
        // Bin 3: (0.40 − 0.50) · ln(0.40 / 0.50) = −0.10 · −0.22314355 = 0.02231436
        // Bin 4 is empty in training: its share is floored to 0.0001,
        //        (0.10 − 0.0001) · ln(0.10 / 0.0001) = 0.0999 · ln(1000) = 0.0999 · 6.90775528 = 0.69008475
        // Sum: 0.73267237.
        var psi = Psi.Compute([0.2, 0.3, 0.5, 0.0], [0.25, 0.25, 0.4, 0.1]);
        Assert.Equal(0.73267237, psi, 1e-8);
        Assert.Equal(DriftBand.Act, Psi.Band(psi));
    }

    [Fact]
    public void An_empty_recent_bin_is_floored_too_and_a_bin_empty_on_both_sides_adds_nothing()
    {
        // (1.0 − 0.5) · ln(1.0 / 0.5) = 0.5 · 0.69314718 = 0.34657359
        // (0.0001 − 0.5) · ln(0.0001 / 0.5) = −0.4999 · ln(0.0002) = −0.4999 · −8.51719319 = 4.25774488
        // (0.0001 − 0.0001) · ln(1) = 0.  Sum: 4.60431847.
        Assert.Equal(4.60431847, Psi.Compute([0.5, 0.5, 0.0], [1.0, 0.0, 0.0]), 1e-8);
    }

    [Fact]
    public void The_same_distribution_has_zero_psi()
    {
        Assert.Equal(0.0, Psi.Compute([0.1, 0.2, 0.7], [0.1, 0.2, 0.7]));
    }

    [Theory]
    [InlineData(0.0, DriftBand.Stable)]
    [InlineData(0.0999, DriftBand.Stable)]
    [InlineData(0.1, DriftBand.Watch)]
    [InlineData(0.25, DriftBand.Watch)]
    [InlineData(0.2501, DriftBand.Act)]
    public void Bands_follow_common_practice(double psi, DriftBand band) => Assert.Equal(band, Psi.Band(psi));

    [Fact]
    public void Different_bin_counts_are_refused() =>
        Assert.Throws<ArgumentException>(() => Psi.Compute([0.5, 0.5], [1.0]));
}
