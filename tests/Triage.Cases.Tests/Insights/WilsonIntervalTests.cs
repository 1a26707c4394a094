using Triage.Cases.Insights;

namespace Triage.Cases.Tests.Insights;

public sealed class WilsonIntervalTests
{
    // Newcombe RG (1998), "Two-sided confidence intervals for the single proportion: comparison of seven
    // methods", Statistics in Medicine 17:857–872, Table I, Wilson score method without continuity
    // correction. Values quoted from memory; they agree with the closed form. Checked to 4 decimals.
    [Theory]
    [InlineData(81, 263, 0.2553, 0.3662)]
    [InlineData(15, 148, 0.0624, 0.1605)]
    [InlineData(0, 20, 0.0000, 0.1611)]
    [InlineData(1, 29, 0.0061, 0.1718)]
    [InlineData(29, 29, 0.8830, 1.0000)]
    public void Matches_Newcombe_1998_table_I(int successes, int trials, double low, double high)
    {
        var interval = WilsonInterval.Of(successes, trials);
        Assert.Equal(low, interval.Low, 0.00005);
        Assert.Equal(high, interval.High, 0.00005);
    }

    [Fact]
    public void No_trials_says_nothing_and_impossible_counts_are_refused()
    {
        Assert.Equal(new Interval(0, 1), WilsonInterval.Of(0, 0));
        var e = Assert.Throws<ArgumentOutOfRangeException>(() => WilsonInterval.Of(5, 3));
        Assert.Contains("5 of 3", e.Message);
    }
}
