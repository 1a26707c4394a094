using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Insights;
using Triage.Cases.Tests.Support;
using Triage.Scoring.Models;

namespace Triage.Cases.Tests.Insights;

public sealed class HistoricCasesTests
{
    [Fact]
    public async Task First_start_closes_a_case_for_each_risky_holdout_claim_with_its_outcome()
    {
        await using var store = TestStore.Create();
        store.WriteSeed(historyRows: 600, openRows: 20);
        await store.Host.Services.InitialiseStoreAsync();

        await using var db = store.NewContext();
        var paths = store.Host.Services.GetRequiredService<TriagePaths>();
        var model = ScoringModel.Load(Path.Combine(paths.DataFolder, (await db.ModelVersions.SingleAsync()).FilePath));
        var history = await db.Claims.Where(c => c.State == ClaimState.Closed).ToListAsync();
        // The holdout as training cuts it: reported after the latest labelled report date less 6 months (Scoring:HoldoutMonths).
        var cutoff = history.Where(c => c.Outcome != VerdictOutcome.Inconclusive).Max(c => c.ReportDate).AddMonths(-6);
        var expected = history.Where(c => c.ReportDate > cutoff && model.Explain(c.FieldValues()).Probability >= 0.3)
            .Select(c => c.ClaimNumber).Order().ToList();

        var closed = await db.Cases.Where(c => !c.IsOpen).Include(c => c.Claim).Include(c => c.Verdicts).Include(c => c.Assignee).Include(c => c.Drivers).ToListAsync();
        Assert.NotEmpty(closed);
        Assert.Equal(expected, closed.Select(c => c.ClaimNumber).Order());
        Assert.All(closed, c =>
        {
            var verdict = Assert.Single(c.Verdicts);
            Assert.Equal(c.Claim!.ClosedDate, verdict.At);
            Assert.True(verdict.Outcome == c.Claim.Outcome || verdict.Outcome == VerdictOutcome.Inconclusive);
            Assert.Equal(verdict.Outcome == VerdictOutcome.ConfirmedFraud ? c.ClaimedAmount : null, verdict.AmountSaved);
            Assert.True(c.Assignee!.Covers(c.Line));
            Assert.Equal(model.Metadata.Version, c.ModelVersion);
        });

        var manager = new Actor("m", "manager", new HashSet<string> { Roles.Manager });
        var rows = await store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<InsightsService>()
            .ByDriverAsync(manager, new InsightFilter(), default);
        Assert.NotEmpty(rows);
        // Each closed case counts once under each of its top three raising drivers.
        Assert.Equal(closed.Sum(c => c.Drivers.Count(d => d.Rank <= 3 && d.Contribution > 0)), rows.Sum(r => r.Confirmed + r.NotFraud + r.Inconclusive));
    }
}
