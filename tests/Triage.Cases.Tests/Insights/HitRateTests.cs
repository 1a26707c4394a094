using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Insights;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.Insights.InsightCases;

namespace Triage.Cases.Tests.Insights;

/// <summary>Hand-built cases whose answers are counted by hand in the comments.</summary>
public sealed class HitRateTests
{
    private static async Task<InsightCases> SeededAsync(string provider)
    {
        var s = new InsightCases(provider);
        var amended = Closed(s.Ines, ["amount"], VerdictOutcome.NotFraud, Day(1, 20));
        await s.SaveAsync(
            // A: four raising drivers, the fourth (loss_hour) is outside the top three.
            Closed(s.Ines, ["amount", "prior", "cover", "loss_hour"], VerdictOutcome.ConfirmedFraud, Day(1, 10)),
            Closed(s.Ines, ["amount", "prior"], VerdictOutcome.NotFraud, Day(1, 12)),
            amended, // counts only as its latest verdict: confirmed, on 5 February
            Closed(s.Tomas, ["prior", "cover"], VerdictOutcome.Inconclusive, Day(2, 8)),
            Closed(s.Tomas, ["amount"], VerdictOutcome.ConfirmedFraud, Day(3, 1), line: "home", model: "v2"),
            Open(["amount", "prior"])); // open: never counted
        // Amended once saved (the amendment points at the stored verdict): not fraud → confirmed, on 5 February.
        await using var db = s.Store.NewContext();
        var c = await db.Cases.Include(x => x.Claim).Include(x => x.Verdicts).SingleAsync(x => x.Id == amended.Id);
        c.AmendVerdict(VerdictOutcome.ConfirmedFraud, "new evidence", null, 500, Build.As(s.Ines), Day(2, 5));
        await db.SaveChangesAsync();
        return s;
    }

    private static (int, int, int) Counts(IReadOnlyList<HitRateRow> rows, string key) =>
        rows.Single(r => r.Key == key) is var r ? (r.Confirmed, r.NotFraud, r.Inconclusive) : default;

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Groups_by_each_of_the_top_three_raising_drivers_counting_only_current_verdicts(string provider)
    {
        await using var s = await SeededAsync(provider);
        var rows = await s.Service().ByDriverAsync(Manager, new InsightFilter(), default);
        Assert.Equal(["amount", "prior", "cover"], rows.Select(r => r.Key)); // most decided first; no loss_hour, no lowering driver
        Assert.Equal((3, 1, 0), Counts(rows, "amount"));
        Assert.Equal((1, 1, 1), Counts(rows, "prior"));
        Assert.Equal((1, 0, 1), Counts(rows, "cover"));
        var amount = rows[0];
        Assert.Equal(0.75, amount.Rate);
        Assert.Equal(WilsonInterval.Of(3, 4), amount.Interval);
        Assert.True(amount.TooFew);
        Assert.Equal("Field amount", amount.Label);
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Filters_by_line_model_version_and_current_verdict_date(string provider)
    {
        await using var s = await SeededAsync(provider);
        var service = s.Service();
        Assert.Equal((2, 1, 0), Counts(await service.ByDriverAsync(Manager, new InsightFilter(Line: "motor"), default), "amount"));
        var v2 = await service.ByDriverAsync(Manager, new InsightFilter(ModelVersion: "v2"), default);
        Assert.Equal((1, 0, 0), Counts(v2, "amount"));
        Assert.Single(v2);
        // 1–31 January: A and B; the amended case's current verdict is dated February, so it is out.
        var january = await service.ByDriverAsync(Manager, new InsightFilter(new DateOnly(2027, 1, 1), new DateOnly(2027, 1, 31)), default);
        Assert.Equal((1, 1, 0), Counts(january, "amount"));
        // To is inclusive: 5 February takes the amended case.
        var toFeb5 = await service.ByDriverAsync(Manager, new InsightFilter(To: new DateOnly(2027, 2, 5)), default);
        Assert.Equal((2, 1, 0), Counts(toFeb5, "amount"));
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task By_investigator_and_by_month_with_amount_saved(string provider)
    {
        await using var s = await SeededAsync(provider);
        var service = s.Service();
        var people = await service.ByInvestigatorAsync(Manager, new InsightFilter(), default);
        Assert.Equal(["INES", "TOMAS"], people.Select(p => p.Label));
        Assert.Equal((2, 1, 0), Counts(people, "INES"));
        Assert.Equal((1, 0, 1), Counts(people, "TOMAS"));

        var months = await service.ByMonthAsync(Manager, new InsightFilter(), default);
        Assert.Equal(["2027-01", "2027-02", "2027-03"], months.Select(m => m.Label));
        Assert.Equal((1, 1, 0), Counts([months[0].Counts], "2027-01"));
        Assert.Equal((1, 0, 1), Counts([months[1].Counts], "2027-02"));
        Assert.Equal([1000.0, 500.0, 1000.0], months.Select(m => m.AmountSaved)); // the amendment's amount, not the first verdict's
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task An_investigator_is_refused(string provider)
    {
        await using var s = await SeededAsync(provider);
        var e = await Assert.ThrowsAsync<AccessDeniedException>(() => s.Service().ByDriverAsync(Investigator, new InsightFilter(), default));
        Assert.Contains("Manager or Admin", e.Message);
    }
}
