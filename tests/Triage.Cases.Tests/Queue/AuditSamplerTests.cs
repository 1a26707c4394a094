using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.Options;
using Triage.Cases.Queue;

namespace Triage.Cases.Tests.Queue;

public sealed class AuditSamplerTests
{
    private static AuditSampler Sampler(double share, int seed = 3) =>
        new(Microsoft.Extensions.Options.Options.Create(new QueueOptions { Threshold = 0.2, AuditShare = share }), new Random(seed));

    [Fact]
    public void Claims_at_or_above_the_threshold_always_queue_with_probability_one()
    {
        var sampler = Sampler(0.02);
        foreach (var p in new[] { 0.2, 0.5, 1.0 })
            Assert.Equal(CaseSelection.ByThreshold, sampler.Decide(p));
        Assert.False(CaseSelection.ByThreshold.AuditSample);
        Assert.Equal(1.0, CaseSelection.ByThreshold.Probability);
    }

    [Fact]
    public void With_no_audit_share_nothing_below_the_threshold_queues()
    {
        var sampler = Sampler(0);
        Assert.All(Enumerable.Range(0, 10_000), _ => Assert.Null(sampler.Decide(0.19)));
    }

    [Fact]
    public void The_share_drawn_below_the_threshold_matches_the_setting()
    {
        const int n = 200_000;
        const double share = 0.02;
        var sampler = Sampler(share);
        var drawn = Enumerable.Range(0, n).Select(_ => sampler.Decide(0.05)).Where(s => s is not null).ToList();
        Assert.All(drawn, s => Assert.True(s!.AuditSample && s.Probability == share));
        // Binomial(n, p): mean n·p = 4,000, standard deviation √(n·p·(1−p)) ≈ 62.6. Five standard
        // deviations either side fails a correct sampler with probability below 1e-6.
        var sd = Math.Sqrt(n * share * (1 - share));
        Assert.InRange(drawn.Count, n * share - 5 * sd, n * share + 5 * sd);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(-0.1)]
    [InlineData(1.5)]
    [InlineData(double.NaN)]
    public void An_audit_selection_needs_a_probability_in_zero_to_one(double share) =>
        Assert.Throws<DomainRuleException>(() => CaseSelection.Audit(share));
}
