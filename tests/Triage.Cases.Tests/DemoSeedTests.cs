using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests;

/// <summary>The shipped demo scenario, end to end, once: it trains on the full history, so it is the slow test.</summary>
public sealed class DemoSeedTests
{
    private static readonly string SeedFolder = Path.Combine(TriageHome.Locate(), "seed-cases");

    [SkippableFact]
    public async Task The_demo_scenario_starts_with_a_workable_queue()
    {
        Skip.IfNot(File.Exists(Path.Combine(SeedFolder, "scenario.json")), $"No demo scenario in {SeedFolder} yet.");
        using var settings = JsonDocument.Parse(File.ReadAllText(Path.Combine(TriageHome.Locate(), "appsettings.json")));
        var threshold = settings.RootElement.GetProperty("Queue").GetProperty("Threshold").GetDouble();
        await using var store = TestStore.Create(extra: new()
        {
            ["Demo:SeedFolder"] = SeedFolder,
            ["Demo:Password"] = "Larchmere-demo-2026",
            ["Queue:Threshold"] = threshold.ToString(System.Globalization.CultureInfo.InvariantCulture),
        });
        await store.Host.Services.InitialiseStoreAsync();

        await using var db = store.NewContext();
        var scenario = JsonDocument.Parse(File.ReadAllText(Path.Combine(SeedFolder, "scenario.json"))).RootElement;
        Assert.Equal(scenario.GetProperty("historyRows").GetInt32(), await db.Claims.CountAsync(c => c.State == ClaimState.Closed));
        Assert.Equal(scenario.GetProperty("openRows").GetInt32(), await db.Claims.CountAsync(c => c.State == ClaimState.Open));

        // The threshold in appsettings.json is tuned so the demo queue is a few days' work for the team.
        var cases = await db.Cases.Where(c => c.IsOpen).Include(c => c.Drivers).Include(c => c.Checks).ToListAsync();
        Assert.InRange(cases.Count, 80, 200);
        Assert.All(cases, c => Assert.True(c.Probability >= threshold));
        // Snapshots keep the explanation whole: base value plus contributions is the scored log-odds
        // (additivity of Shapley values, Lundberg & Lee 2017), to 1e-6 for float rounding in the trees.
        Assert.All(cases, c => Assert.Equal(c.LogOdds, c.BaseLogOdds + c.Drivers.Sum(d => d.Contribution), 6));
        Assert.True(cases.Count(c => c.Checks.Count > 0) > cases.Count / 2, "Most demo cases should get playbook checks.");
        Assert.Equal(13, await db.Users.CountAsync());
        Assert.True(await db.Cases.AnyAsync(c => c.AssigneeId != null));
        // The holdout months' history becomes closed cases, enough for the manager pages to judge the main drivers.
        Assert.InRange(await db.Cases.CountAsync(c => !c.IsOpen), 300, 2_000);
    }
}
