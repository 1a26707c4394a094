using Triage.Cases.Domain;
using Triage.Cases.Insights;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.Insights.InsightCases;

namespace Triage.Cases.Tests.Insights;

public sealed class CalibrationAndQueueTests
{
    private static readonly DateTime Today = Build.Now.Date; // 15 March 2027

    private static async Task<InsightCases> SeededAsync(string provider)
    {
        var s = new InsightCases(provider);
        await s.SaveAsync(
            Closed(s.Ines, ["amount"], VerdictOutcome.ConfirmedFraud, Day(2, 1), probability: 0.35),
            Closed(s.Ines, ["amount"], VerdictOutcome.NotFraud, Day(2, 1), probability: 0.32),
            Closed(s.Ines, ["amount"], VerdictOutcome.Inconclusive, Day(2, 1), probability: 0.38),
            Closed(s.Ines, ["amount"], VerdictOutcome.ConfirmedFraud, Day(2, 1), probability: 0.75),
            Closed(s.Ines, ["amount"], VerdictOutcome.ConfirmedFraud, Day(2, 1), probability: 0.71),
            Open(["amount"], opened: Today.AddDays(-1)),
            Open(["amount"], opened: Today.AddDays(-4)),
            Open(["amount"], opened: Today.AddDays(-15)), // due 10 days after opening: overdue
            Open(["amount"], opened: Today.AddDays(-30), line: "home")); // overdue
        return s;
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Calibration_puts_decided_cases_in_tenth_bands_beside_their_mean_prediction(string provider)
    {
        await using var s = await SeededAsync(provider);
        var rows = await s.Service().CalibrationAsync(Manager, new InsightFilter(), default);
        Assert.Equal(2, rows.Count);
        // 0.3–0.4: the inconclusive 0.38 is left out; one of two confirmed; mean of 0.35 and 0.32.
        Assert.Equal((0.3, 0.4, 2, 1), (rows[0].BandLow, rows[0].BandHigh, rows[0].Decided, rows[0].Confirmed));
        Assert.Equal(0.335, rows[0].MeanPredicted, 1e-12);
        Assert.Equal(0.5, rows[0].ObservedRate);
        Assert.Equal((0.7, 0.8, 2, 2), (rows[1].BandLow, rows[1].BandHigh, rows[1].Decided, rows[1].Confirmed));
        Assert.Equal(0.73, rows[1].MeanPredicted, 1e-12);
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Queue_age_counts_open_cases_by_days_since_opening_and_overdue(string provider)
    {
        await using var s = await SeededAsync(provider);
        var rows = await s.Service().QueueAgeAsync(Manager, null, default);
        Assert.Equal([1, 1, 0, 1, 1], rows.Select(r => r.Open));
        Assert.Equal([0, 0, 0, 1, 1], rows.Select(r => r.Overdue));
        var home = await s.Service().QueueAgeAsync(Manager, "home", default);
        Assert.Equal([0, 0, 0, 0, 1], home.Select(r => r.Open));
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Tables_write_as_csv_with_a_header_and_invariant_numbers(string provider)
    {
        await using var s = await SeededAsync(provider);
        var rows = await s.Service().CalibrationAsync(Manager, new InsightFilter(), default);
        using var text = new StringWriter();
        InsightsCsv.Calibration(text, rows);
        var lines = text.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        Assert.Equal("band_low,band_high,decided,confirmed,mean_predicted,observed_rate,wilson95_low,wilson95_high", lines[0]);
        Assert.StartsWith("0.3,0.4,2,1,0.335,0.5,", lines[1]);
        Assert.Equal(3, lines.Length);

        using var empty = new StringWriter();
        InsightsCsv.HitRates(empty, [], "driver");
        Assert.StartsWith("driver,key,confirmed,", empty.ToString()); // an empty table still says what its columns are
    }
}
