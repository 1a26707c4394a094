using Microsoft.EntityFrameworkCore;

namespace Triage.Cases.Tests.Intake;

/// <summary>An intake store that draws half of the claims below the threshold for the audit sample.</summary>
public sealed class AuditSampleFixture : IntakeFixture
{
    public const double Share = 0.5;

    protected override IReadOnlyDictionary<string, string?> ExtraSettings =>
        new Dictionary<string, string?> { ["Queue:AuditShare"] = Share.ToString(System.Globalization.CultureInfo.InvariantCulture) };
}

public sealed class AuditSampleIntakeTests(AuditSampleFixture fixture) : IClassFixture<AuditSampleFixture>
{
    private const double Threshold = 0.3; // TestStore's Queue:Threshold

    [Fact]
    public async Task Claims_below_the_threshold_are_drawn_for_the_audit_sample_with_their_probability()
    {
        var report = await fixture.ImportCsvAsync(IntakeRows.Csv(IntakeRows.Many(300, "AUD")));
        Assert.False(report.Rejected, string.Join("\n", report.Errors));

        await using var db = fixture.Store.NewContext();
        var scores = await db.ClaimScores.AsNoTracking().Include(s => s.Claim).Where(s => s.Claim!.ClaimNumber.StartsWith("AUD-")).ToListAsync();
        var cases = await db.Cases.AsNoTracking().Where(c => c.ClaimNumber.StartsWith("AUD-")).ToDictionaryAsync(c => c.ClaimNumber);
        Assert.Equal(report.Queued, cases.Count);
        var below = scores.Where(s => s.Probability < Threshold).ToList();
        Assert.NotEmpty(below);
        foreach (var s in scores)
        {
            var opened = cases.TryGetValue(s.Claim!.ClaimNumber, out var c);
            Assert.Equal(opened, s.Queued);
            if (s.Probability >= Threshold)
            {
                Assert.True(opened);
                Assert.False(c!.IsAuditSample);
                Assert.Equal(1.0, c.SelectionProbability);
            }
            else if (opened)
            {
                Assert.True(c!.IsAuditSample);
                Assert.Equal(AuditSampleFixture.Share, c.SelectionProbability);
            }
        }
        // Binomial(n, ½) over the claims below the threshold: within five standard deviations of n/2.
        var drawn = cases.Values.Count(c => c.IsAuditSample);
        var sd = Math.Sqrt(below.Count * AuditSampleFixture.Share * (1 - AuditSampleFixture.Share));
        Assert.InRange(drawn, below.Count / 2.0 - 5 * sd, below.Count / 2.0 + 5 * sd);
        var opening = await db.AuditEvents.AsNoTracking().Where(a => a.What == "case.opened" && a.Detail!.Contains("audit sample")).CountAsync();
        Assert.True(opening >= drawn);
    }
}
