using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Cases.Models;

namespace Triage.Cases.Tests.Models;

public class RetrainServiceTests
{
    [Fact]
    public async Task Retrain_registers_a_challenger_compared_with_the_champion_which_keeps_serving()
    {
        await using var s = await ModelStore.CreateAsync();
        var result = await s.RetrainAsync();
        Assert.Equal(RetrainOutcome.Succeeded, result.Outcome);
        Assert.Equal("v2", result.Version);
        var versions = await s.VersionsAsync();
        Assert.Equal([("v1", ModelStatus.Champion, true), ("v2", ModelStatus.Challenger, false)], versions.Select(v => (v.Version, v.Status, v.IsServing)));
        var v2 = versions[1];
        Assert.Equal("ana.lyst", v2.TrainedBy);
        Assert.Equal("v1", v2.ComparedWith);
        var comparison = ModelRegistry.Comparison(v2)!;
        Assert.NotNull(comparison.Champion);
        Assert.Equal("v1", comparison.Champion!.Version);
        // k is the team's daily capacity: tiny seed investigators 5 + 3 + 2.
        Assert.Equal(10, comparison.K);
        Assert.Equal(comparison.HoldoutRows, comparison.Challenger.Calibration.Sum(b => b.Count));
        Assert.Contains(comparison.Importance, r => r.Field == "claimed_amount" && r.Challenger > 0);
        Assert.True(File.Exists(Path.Combine(s.Store.Folder, "data", v2.FilePath)));
        Assert.Single(await s.AuditAsync("model.retrained"));
    }

    [Fact]
    public async Task Training_rows_are_history_plus_current_verdicts_without_inconclusive()
    {
        await using var s = await ModelStore.CreateAsync();
        await using var db = s.Store.NewContext();
        var (_, model) = await s.Get<ServingModels>().CurrentAsync(db, default);
        var set = await new TrainingSetReader(db).ReadAsync(model.Schema, default);
        var claimsWithoutCase = await db.Claims.CountAsync(c => c.Outcome != null && c.Outcome != VerdictOutcome.Inconclusive && !db.Cases.Any(k => k.ClaimId == c.Id));
        var closed = await db.Cases.Where(c => !c.IsOpen).Select(c => c.Verdicts.Single(v => v.SupersededAt == null).Outcome).ToListAsync();
        Assert.Equal(claimsWithoutCase, set.FromHistory);
        Assert.Equal(closed.Count(o => o != VerdictOutcome.Inconclusive), set.FromVerdicts);
        Assert.Equal(closed.Count(o => o == VerdictOutcome.Inconclusive), set.InconclusiveLeftOut);
        Assert.True(set.InconclusiveLeftOut > 0, "the demo history turns some verdicts inconclusive");
        Assert.Equal(set.FromHistory + set.FromVerdicts, set.Rows.Count);
        // Audit-sample cases weigh 1/π (Horvitz & Thompson 1952); everything else 1.
        var auditShares = await db.Cases.Where(c => !c.IsOpen && c.IsAuditSample && c.Verdicts.Any(v => v.SupersededAt == null && v.Outcome != VerdictOutcome.Inconclusive))
            .Select(c => c.SelectionProbability).ToListAsync();
        Assert.Equal(auditShares.Count, set.AuditSample);
        Assert.Equal(auditShares.Select(p => 1 / p).Order(), set.Rows.Where(r => r.Weight != 1.0).Select(r => r.Weight).Order());
    }

    [Fact]
    public async Task Cancelled_mid_way_leaves_the_champion_serving_and_nothing_registered()
    {
        await using var s = await ModelStore.CreateAsync();
        var state = s.Get<RetrainState>();
        var cancelled = false;
        state.Changed += () =>
        {
            // Cancel from the page's side as soon as the fit begins.
            if (cancelled || state.Current?.Stage != "Training") return;
            cancelled = true;
            s.InScopeAsync(async sp => { await sp.GetRequiredService<RetrainService>().CancelAsync(ModelStore.Analyst); return 0; }).GetAwaiter().GetResult();
        };
        var result = await s.RetrainAsync();
        Assert.True(cancelled);
        Assert.Equal(RetrainOutcome.Cancelled, result.Outcome);
        Assert.Contains("serving model is unchanged", result.Message);
        await AssertUntouchedAsync(s);
        Assert.Single(await s.AuditAsync("model.retrain-cancelled"));
        Assert.Null(state.Current);
        Assert.Equal(result, state.Last);
        // The slot is free again.
        Assert.Equal(RetrainOutcome.Succeeded, (await s.RetrainAsync()).Outcome);
    }

    [Fact]
    public async Task A_failure_while_saving_leaves_the_champion_serving_and_says_why()
    {
        await using var s = await ModelStore.CreateAsync();
        // Injected fault: a folder where the new model file must go, so writing it fails after training.
        Directory.CreateDirectory(Path.Combine(s.ModelsFolder, "v2.model"));
        var result = await s.RetrainAsync();
        Assert.Equal(RetrainOutcome.Failed, result.Outcome);
        Assert.Contains("saving the challenger", result.Message);
        await AssertUntouchedAsync(s);
        var audit = Assert.Single(await s.AuditAsync("model.retrain-failed"));
        Assert.Contains("saving the challenger", audit);
        Assert.Empty(Directory.GetFiles(s.ModelsFolder, "*.tmp", SearchOption.AllDirectories).Concat(Directory.GetFiles(s.ModelsFolder, ".*")));
    }

    [Fact]
    public async Task Only_one_retrain_at_a_time()
    {
        await using var s = await ModelStore.CreateAsync();
        // The host is not started, so the background worker never picks the first one up: it stays running.
        var first = await s.InScopeAsync(sp => { var r = sp.GetRequiredService<RetrainService>(); return r.StartAsync(ModelStore.Analyst, r.Defaults()); });
        var refused = await Assert.ThrowsAsync<DomainRuleException>(() => s.RetrainAsync());
        Assert.Contains("only one runs at a time", refused.Message);
        Assert.Contains("ana.lyst", refused.Message);
        Assert.Equal(first.Id, s.Get<RetrainState>().Current!.Id);
        Assert.Single(await s.AuditAsync("model.retrain-started"));
    }

    [Fact]
    public async Task The_background_worker_runs_a_started_retrain()
    {
        await using var s = await ModelStore.CreateAsync();
        await s.Store.Host.StartAsync();
        var state = s.Get<RetrainState>();
        var done = new TaskCompletionSource<RetrainResult>(TaskCreationOptions.RunContinuationsAsynchronously);
        state.Changed += () => { if (state.Last is { } last) done.TrySetResult(last); };
        await s.InScopeAsync(sp => { var r = sp.GetRequiredService<RetrainService>(); return r.StartAsync(ModelStore.Analyst, r.Defaults()); });
        var result = await done.Task.WaitAsync(TimeSpan.FromMinutes(3));
        Assert.Equal(RetrainOutcome.Succeeded, result.Outcome);
        Assert.Equal("v2", (await s.VersionsAsync())[1].Version);
        await s.Store.Host.StopAsync();
    }

    [Fact]
    public async Task Invalid_settings_and_the_wrong_role_are_refused_in_the_service()
    {
        await using var s = await ModelStore.CreateAsync();
        await s.InScopeAsync(async sp =>
        {
            var r = sp.GetRequiredService<RetrainService>();
            await Assert.ThrowsAsync<AccessDeniedException>(() => r.StartAsync(ModelStore.Investigator, r.Defaults()));
            await Assert.ThrowsAsync<AccessDeniedException>(() => r.RunAsync(ModelStore.Manager, r.Defaults()));
            await Assert.ThrowsAsync<AccessDeniedException>(() => r.CancelAsync(ModelStore.Manager));
            var bad = r.Defaults();
            bad.FastTree.NumberOfLeaves = 1;
            var e = await Assert.ThrowsAsync<DomainRuleException>(() => r.StartAsync(ModelStore.Analyst, bad));
            Assert.Contains("FastTree", e.Message);
            return 0;
        });
        Assert.Null(s.Get<RetrainState>().Current);
        Assert.Empty(await s.AuditAsync("model.retrain"));
    }

    private static async Task AssertUntouchedAsync(ModelStore s)
    {
        var versions = await s.VersionsAsync();
        var only = Assert.Single(versions);
        Assert.Equal(("v1", ModelStatus.Champion, true), (only.Version, only.Status, only.IsServing));
        Assert.Equal(["v1.model"], Directory.GetFiles(s.ModelsFolder).Select(Path.GetFileName));
        await using var db = s.Store.NewContext();
        Assert.Equal("v1", (await s.Get<ServingModels>().CurrentAsync(db, default)).Version.Version);
    }
}
