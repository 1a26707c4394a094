using Triage.Cases.Domain;
using Triage.Cases.Insights;
using Triage.Cases.Intake;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.Insights.InsightCases;

namespace Triage.Cases.Tests.Insights;

public sealed class AuditSampleInsightTests
{
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Estimates_fraud_below_the_threshold_from_the_audit_sample_only(string provider)
    {
        await using var s = new InsightCases(provider);
        var audit = CaseSelection.Audit(0.02);
        await s.SaveAsync(
            Closed(s.Ines, ["amount"], VerdictOutcome.ConfirmedFraud, Day(2, 1), probability: 0.05, selection: audit),
            Closed(s.Ines, ["amount"], VerdictOutcome.NotFraud, Day(2, 2), probability: 0.04, selection: audit),
            Closed(s.Tomas, ["prior"], VerdictOutcome.NotFraud, Day(2, 3), probability: 0.03, selection: audit),
            Closed(s.Tomas, ["prior"], VerdictOutcome.NotFraud, Day(2, 4), probability: 0.06, selection: audit),
            Closed(s.Tomas, ["prior"], VerdictOutcome.Inconclusive, Day(2, 5), probability: 0.02, selection: audit),
            Open(["amount"], probability: 0.01, selection: audit), // still open: counted apart
            Closed(s.Ines, ["amount"], VerdictOutcome.ConfirmedFraud, Day(2, 6))); // queued by threshold: not in the sample
        await using (var db = s.Store.NewContext())
        {
            // 46 claims scored below the threshold and not queued.
            db.ClaimScores.AddRange(Enumerable.Range(0, 46).Select(_ => ClaimScore.Record(Build.Claim(), Build.Explanation(0.03), "v1", queued: false, Day(2, 1))));
            await db.SaveChangesAsync();
        }

        var row = await s.Service().AuditSampleAsync(Manager, new InsightFilter(), default);

        // Counted by hand: 1 confirmed, 3 not fraud, 1 inconclusive → rate 1/4.
        Assert.Equal((1, 3, 1, 1, 46), (row.Sample.Confirmed, row.Sample.NotFraud, row.Sample.Inconclusive, row.StillOpen, row.NotQueued));
        Assert.Equal(0.25, row.Sample.Rate);
        // Wilson (1927) interval for 1 of 4 at 95%, worked by hand from the formula: 0.0456–0.6994.
        Assert.Equal(0.0456, row.Sample.Interval.Low, 4);
        Assert.Equal(0.6994, row.Sample.Interval.High, 4);
        Assert.Equal(11.5, row.MissedEstimate);
        Assert.Equal(46 * 0.6994, row.MissedInterval.High, 2);
        await Assert.ThrowsAsync<AccessDeniedException>(() => s.Service().AuditSampleAsync(Investigator, new InsightFilter(), default));
    }
}
