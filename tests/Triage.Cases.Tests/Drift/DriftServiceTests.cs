using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Triage.Cases.Domain;
using Triage.Cases.Drift;
using Triage.Cases.Tests.Support;
using Triage.Scoring.Drift;

namespace Triage.Cases.Tests.Drift;

public sealed class DriftServiceTests
{
    private static readonly Actor Analyst = new("a", "analyst", new HashSet<string> { Roles.Analyst });

    private static async Task<TestStore> SeededAsync(string windowDays = "30")
    {
        var store = TestStore.Create(extra: new() { ["Drift:WindowDays"] = windowDays });
        store.WriteSeed(historyRows: 600, openRows: 80);
        await store.Host.Services.InitialiseStoreAsync();
        return store;
    }

    private static DriftService Service(TestStore store) => store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<DriftService>();

    [Fact]
    public async Task Compares_the_serving_models_training_data_with_the_claims_scored_in_the_window()
    {
        await using var store = await SeededAsync();
        var report = await Service(store).CurrentAsync(Analyst, default);
        Assert.True(report.IsAvailable, report.Unavailable);
        Assert.Equal("v1", report.ModelVersion);
        // The 80 open claims were scored on arrival and reported in the last 20 days; history claims have no arrival score.
        Assert.Equal(80, report.Claims);
        Assert.Equal(new DateOnly(2027, 2, 14), report.From);
        Assert.Equal(new DateOnly(2027, 3, 15), report.To);

        // The line's recent shares, counted straight from the store, against the model's own baseline, summed by the PSI formula by hand.
        await using var db = store.NewContext();
        var lines = await db.Claims.Where(c => c.State == ClaimState.Open).GroupBy(c => c.Line).Select(g => new { g.Key, N = g.Count() }).ToDictionaryAsync(g => g.Key, g => g.N);
        var line = report.Fields.Single(f => f.Field == "line");
        Assert.Equal("Line of business", line.DisplayName);
        var expected = line.Drift.Bins.Select(b => b.Expected).ToArray();
        var actual = new[] { "motor", "home", "travel" }.Select(l => lines.GetValueOrDefault(l) / 80.0).Append(0.0).ToArray();
        Assert.Equal(actual, line.Drift.Bins.Select(b => b.Actual));
        var byHand = expected.Zip(actual).Sum(p => (Math.Max(p.Second, 1e-4) - Math.Max(p.First, 1e-4)) * Math.Log(Math.Max(p.Second, 1e-4) / Math.Max(p.First, 1e-4)));
        Assert.Equal(byHand, line.Psi, 12);

        // Every feature field and the score are covered; the shares of each add up to one.
        Assert.Equal(["line", "loss_cause", "loss_hour"], report.Fields.Take(3).Select(f => f.Field));
        Assert.All(report.Fields, f => Assert.Equal(1.0, f.Drift.Bins.Sum(b => b.Actual), 9));
        Assert.NotNull(report.Score);
        Assert.Equal(1.0, report.Score!.Bins.Sum(b => b.Expected), 9);
        // TinySeed's history has one branch office and one age band only, so a field outside them cannot drift: branch stays stable.
        Assert.Equal(DriftBand.Stable, report.Fields.Single(f => f.Field == "branch_office").Band);

        // 80 claims is below Drift:MinimumClaims (200): the figures stand, but nothing is flagged however high.
        Assert.True(report.TooFewClaims);
        Assert.Empty(report.Flagged);
        Assert.False(report.ScoreFlagged);
    }

    [Fact]
    public async Task With_enough_claims_fields_past_the_act_threshold_are_flagged_most_drifted_first()
    {
        var store = TestStore.Create(extra: new() { ["Drift:MinimumClaims"] = "50" });
        await using var _ = store;
        store.WriteSeed(historyRows: 600, openRows: 80);
        await store.Host.Services.InitialiseStoreAsync();
        var report = await Service(store).CurrentAsync(Analyst, default);
        Assert.False(report.TooFewClaims);
        var act = report.Fields.Where(f => f.Band == DriftBand.Act).OrderByDescending(f => f.Psi).Select(f => f.Field).ToList();
        Assert.Equal(act, report.Flagged.Select(f => f.Field));
        // 80 claims over the 41 repairer bins: noise alone gives about 40 / 80 = 0.5, past 0.25.
        Assert.Contains("repairer_code", act);
    }

    [Fact]
    public async Task The_window_is_configurable_and_an_empty_window_says_so()
    {
        await using var store = await SeededAsync(windowDays: "1");
        await using var db = store.NewContext();
        var today = new DateTime(2027, 3, 15, 0, 0, 0, DateTimeKind.Utc);
        var count = await db.Claims.CountAsync(c => c.State == ClaimState.Open && c.ReportDate >= today);
        var report = await Service(store).CurrentAsync(Analyst, default);
        if (count == 0)
            Assert.Contains("nothing to compare", report.Unavailable);
        else
            Assert.Equal(count, report.Claims);
        Assert.Equal(report.To, report.From);
    }

    [Fact]
    public async Task No_serving_model_and_an_investigator_are_handled()
    {
        await using var store = TestStore.Create();
        await store.MigratedAsync();
        var report = await Service(store).CurrentAsync(Analyst, default);
        Assert.False(report.IsAvailable);
        Assert.Contains("No model is serving", report.Unavailable);

        var investigator = new Actor("i", "ines", new HashSet<string> { Roles.Investigator });
        var e = await Assert.ThrowsAsync<AccessDeniedException>(() => Service(store).CurrentAsync(investigator, default));
        Assert.Contains("Analyst or Manager or Admin", e.Message);
    }

    [Fact]
    public async Task A_window_of_zero_days_stops_the_start_naming_the_key()
    {
        await using var store = TestStore.Create(extra: new() { ["Drift:WindowDays"] = "0" });
        var e = await Assert.ThrowsAnyAsync<Exception>(() => store.Host.StartAsync());
        Assert.Contains("WindowDays", e.Message);
    }
}
