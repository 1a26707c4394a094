using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Npgsql;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Instances;
using Triage.Cases.Intake;
using Triage.Cases.Models;
using Triage.Cases.Queue;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Instances;

/// <summary>Two instances on one PostgreSQL store (skipped without TRIAGE_TEST_POSTGRES).</summary>
public class TwoInstancesTests
{
    private static readonly Actor Analyst = new("id-analyst", "ana.lyst", new HashSet<string> { Roles.Analyst });

    // The model check's period is long, so a switch within the test can only come from the notice.
    private static readonly Dictionary<string, string?> NoticesOnly = new() { ["Instances:ModelCheckSeconds"] = "3600" };

    [SkippableFact]
    public async Task Both_start_together_and_the_store_is_seeded_once()
    {
        await using var two = await TwoInstances.StartAsync("Postgres", NoticesOnly);
        await using var db = two.NewContext();
        Assert.Equal(1, await db.AuditEvents.CountAsync(a => a.What == "seed.loaded"));
        Assert.Equal(580, await db.Claims.CountAsync());
        Assert.Equal(["v1"], await db.ModelVersions.Select(v => v.Version).ToListAsync());
    }

    [SkippableFact]
    public async Task A_case_taken_on_one_instance_is_not_offered_on_the_other_even_when_they_race()
    {
        await using var two = await TwoInstances.StartAsync("Postgres", NoticesOnly);
        var ines = await two.ActorAsync("ines.varga", Roles.Investigator);
        var mara = await two.ActorAsync("mara.holt", Roles.Investigator, Roles.TeamLead);
        Task<TakenCase?> Take(Microsoft.Extensions.Hosting.IHost host, Actor who) =>
            two.InScopeAsync(host, sp => sp.GetRequiredService<TakeNextService>().TakeNextAsync(who));

        int pool;
        await using (var db = two.NewContext()) pool = await db.Cases.CountAsync(c => c.IsOpen && c.AssigneeId == null);
        Assert.True(pool >= 6, $"the tiny seed leaves {pool} unassigned cases; the race needs a few");

        var first = await Take(two.A, mara);
        var second = await Take(two.B, mara);
        Assert.NotNull(first);
        Assert.NotNull(second);
        Assert.NotEqual(first.CaseId, second.CaseId);

        // Eight takes at once, split over the instances and two people: no case goes out twice.
        var race = await Task.WhenAll(Enumerable.Range(0, 8).Select(i => Task.Run(() => Take(i % 2 == 0 ? two.A : two.B, i % 4 < 2 ? mara : ines))));
        var taken = race.Where(t => t is not null).Select(t => t!.CaseId).ToList();
        Assert.Equal(taken.Count, taken.Distinct().Count());
        Assert.DoesNotContain(first.CaseId, taken);
        Assert.DoesNotContain(second.CaseId, taken);
        await using var after = two.NewContext();
        var assigned = await after.Cases.Where(c => taken.Contains(c.Id)).Select(c => c.AssigneeId).ToListAsync();
        Assert.All(assigned, a => Assert.Contains(a, new[] { ines.UserId, mara.UserId }));
    }

    [SkippableFact]
    public async Task A_reassignment_on_one_instance_reaches_the_pages_of_the_other_and_neither_hears_itself_twice()
    {
        await using var two = await TwoInstances.StartAsync("Postgres", NoticesOnly);
        var lead = await two.ActorAsync("mara.holt", Roles.TeamLead, Roles.Investigator);
        var ines = await two.ActorAsync("ines.varga", Roles.Investigator);
        var onA = new List<CaseChanged>();
        var onB = new List<CaseChanged>();
        using var subA = two.A.Services.GetRequiredService<CaseEvents>().Subscribe(c => { lock (onA) onA.Add(c); });
        using var subB = two.B.Services.GetRequiredService<CaseEvents>().Subscribe(c => { lock (onB) onB.Add(c); });

        CaseSeen seen;
        await using (var db = two.NewContext())
            seen = await db.Cases.Where(c => c.IsOpen && c.AssigneeId == null && (c.Line == "motor" || c.Line == "home"))
                .OrderBy(c => c.Id).Select(c => new CaseSeen(c.Id, c.Version)).FirstAsync();
        await two.InScopeAsync(two.A, async sp => { await sp.GetRequiredService<ReassignService>().ReassignAsync([seen], ines.UserId, "covering", lead); return 0; });
        await TwoInstances.EventuallyAsync(() => { lock (onB) return onB.Count > 0; }, "the reassignment on A to reach B");

        // Now B changes the same case; A hears it. PostgreSQL delivers notices in commit order, so by the
        // time A hears B's, A has already met (and skipped) the echo of its own.
        await using (var db = two.NewContext())
            seen = await db.Cases.Where(c => c.Id == seen.CaseId).Select(c => new CaseSeen(c.Id, c.Version)).SingleAsync();
        await two.InScopeAsync(two.B, async sp => { await sp.GetRequiredService<ReassignService>().ReturnToPoolAsync([seen], "back to the pool", lead); return 0; });
        await TwoInstances.EventuallyAsync(() => { lock (onA) return onA.Count > 1; }, "the return to pool on B to reach A");

        CaseChanged[] expected = [new(seen.CaseId, "case.assigned"), new(seen.CaseId, "case.returned")];
        lock (onA) Assert.Equal(expected, onA);
        lock (onB) Assert.Equal(expected, onB);
    }

    [SkippableFact]
    public async Task A_retrain_on_one_instance_refuses_a_second_on_the_other_and_a_promotion_switches_both()
    {
        await using var two = await TwoInstances.StartAsync("Postgres", NoticesOnly);
        var servingOnB = two.B.Services.GetRequiredService<ServingModels>();
        await TwoInstances.EventuallyAsync(() => servingOnB.Version == "v1", "B to load v1");

        var stateA = two.A.Services.GetRequiredService<RetrainState>();
        Exception? refused = null;
        var tried = false;
        stateA.Changed += () =>
        {
            // While A trains (its handler runs on A's training thread, so A is mid-run), B tries to start one.
            if (tried || stateA.Current?.Stage != "Training") return;
            tried = true;
            refused = Record.Exception(() => two.InScopeAsync(two.B, sp =>
            {
                var retrain = sp.GetRequiredService<RetrainService>();
                return retrain.StartAsync(Analyst with { UserName = "other.analyst" }, retrain.Defaults());
            }).GetAwaiter().GetResult());
        };
        var result = await two.InScopeAsync(two.A, sp => { var r = sp.GetRequiredService<RetrainService>(); return r.RunAsync(Analyst, r.Defaults()); });

        Assert.True(tried);
        var rule = Assert.IsType<DomainRuleException>(refused);
        Assert.Contains("already running on another instance", rule.Message);
        Assert.Contains("started by ana.lyst at 09:30 UTC", rule.Message);
        Assert.Null(two.B.Services.GetRequiredService<RetrainState>().Current);
        Assert.Equal(RetrainOutcome.Succeeded, result.Outcome);
        Assert.Equal("v2", result.Version);
        // A's run is over: its lock went with it.
        using (var free = await two.B.Services.GetRequiredService<IClusterLocks>().TryAcquireAsync(ClusterLock.Retrain, default))
            Assert.NotNull(free);

        await two.InScopeAsync(two.A, sp => sp.GetRequiredService<ModelRegistry>().PromoteAsync(Analyst, "v2", "better on the holdout", rescoreOpenCases: false));
        Assert.Equal("v2", two.A.Services.GetRequiredService<ServingModels>().Version);
        await TwoInstances.EventuallyAsync(() => servingOnB.Version == "v2", "B to serve v2 after the promotion on A");
        // And a claim scored on B now uses v2.
        await using var db = two.NewContext();
        var (version, model) = await servingOnB.CurrentAsync(db, default);
        Assert.Equal(("v2", "v2"), (version.Version, model.Metadata.Version));
    }

    [SkippableFact]
    public async Task The_retrain_lock_of_an_instance_that_died_is_released_by_the_server()
    {
        await using var two = await TwoInstances.StartAsync("Postgres", NoticesOnly);
        var locksA = two.A.Services.GetRequiredService<IClusterLocks>();
        var locksB = two.B.Services.GetRequiredService<IClusterLocks>();
        var held = await locksA.TryAcquireAsync(ClusterLock.Retrain, default);
        Assert.NotNull(held);
        Assert.Null(await locksB.TryAcquireAsync(ClusterLock.Retrain, default));
        var refused = await Assert.ThrowsAsync<DomainRuleException>(() => two.InScopeAsync(two.B, sp =>
        {
            var retrain = sp.GetRequiredService<RetrainService>();
            return retrain.StartAsync(Analyst, retrain.Defaults());
        }));
        Assert.Contains("already running on another instance", refused.Message);

        // A "crashes": its session ends without unlocking (as when the process dies and the connection drops).
        Assert.Equal(1L, await EndRetrainLockSessionsAsync(two));
        using var now = await TakeWhenFreeAsync(locksB);
        Assert.NotNull(now);
        held!.Dispose();
    }

    [SkippableFact]
    public async Task A_retrain_whose_lock_session_ends_midway_registers_nothing_and_says_why()
    {
        await using var two = await TwoInstances.StartAsync("Postgres", NoticesOnly);
        var stateA = two.A.Services.GetRequiredService<RetrainState>();
        var cut = false;
        stateA.Changed += () =>
        {
            // On A's training thread, mid-run: the server ends the session holding A's lock, as a dropped connection
            // would, while A's process carries on unaware.
            if (cut || stateA.Current?.Stage != "Training") return;
            cut = true;
            Assert.Equal(1L, EndRetrainLockSessionsAsync(two).GetAwaiter().GetResult());
        };
        Task<RetrainResult> Retrain() => two.InScopeAsync(two.A, sp => { var r = sp.GetRequiredService<RetrainService>(); return r.RunAsync(Analyst, r.Defaults()); });
        var result = await Retrain();

        Assert.True(cut);
        Assert.Equal(RetrainOutcome.Failed, result.Outcome);
        Assert.Contains("lost the retrain lock", result.Message);
        Assert.Contains("The serving model is unchanged", result.Message);
        await using (var db = two.NewContext())
        {
            Assert.Equal(["v1"], await db.ModelVersions.Select(v => v.Version).ToListAsync());
            Assert.Equal(1, await db.AuditEvents.CountAsync(a => a.What == "model.retrain-failed" && a.Detail!.Contains("lost the retrain lock")));
        }
        Assert.Equal("v1", two.A.Services.GetRequiredService<ServingModels>().Version);
        Assert.False(File.Exists(Path.Combine(two.A.Services.GetRequiredService<Triage.Cases.Hosting.TriagePaths>().ModelsFolder, "v2.model")));

        // Nothing is left held or half-written: the next retrain takes the lock and the name.
        var again = await Retrain();
        Assert.Equal((RetrainOutcome.Succeeded, "v2"), (again.Outcome, again.Version));
    }

    /// <summary>Has the server end every session holding a retrain lock and waits until they are gone; returns how many it ended.</summary>
    private static async Task<long> EndRetrainLockSessionsAsync(TwoInstances two)
    {
        const string Sessions = "FROM pg_stat_activity WHERE datname = current_database() AND application_name = 'triage lock Retrain'";
        await using var db = two.NewContext();
        var conn = (NpgsqlConnection)db.Database.GetDbConnection();
        await conn.OpenAsync();
        await using var kill = new NpgsqlCommand($"SELECT count(pg_terminate_backend(pid)) {Sessions}", conn);
        var ended = (long)(await kill.ExecuteScalarAsync())!;
        await using var left = new NpgsqlCommand($"SELECT count(*) {Sessions}", conn);
        await TwoInstances.EventuallyAsync(() => (long)left.ExecuteScalar()! == 0, "the ended sessions to be gone");
        return ended;
    }

    // The server ends a terminated backend asynchronously: retry briefly rather than assume it is instant.
    private static async Task<IDisposable?> TakeWhenFreeAsync(IClusterLocks locks)
    {
        IDisposable? held = null;
        await TwoInstances.EventuallyAsync(() => (held ??= locks.TryAcquireAsync(ClusterLock.Retrain, default).GetAwaiter().GetResult()) is not null,
            "the dead holder's lock to be released");
        return held;
    }
}

/// <summary>The advisory locks on their own, on the server's maintenance database (skipped without TRIAGE_TEST_POSTGRES).</summary>
public class AdvisoryLockTests
{
    [SkippableFact]
    public async Task Waiting_for_a_turn_outlasts_the_command_timeout()
    {
        Skip.If(TestStore.PostgresSkipReason is not null, TestStore.PostgresSkipReason);
        // A first start can take minutes; the waiting instance must not give up after the (here 1 s) command timeout.
        var cs = new NpgsqlConnectionStringBuilder(Environment.GetEnvironmentVariable(TestStore.PostgresEnv)) { CommandTimeout = 1 }.ConnectionString;
        var locks = new PostgresAdvisoryLocks(Microsoft.Extensions.Options.Options.Create(new Triage.Cases.Options.StorageOptions { Provider = "Postgres", ConnectionString = cs }));
        var first = await locks.AcquireAsync(ClusterLock.FirstStart, default);
        var second = locks.AcquireAsync(ClusterLock.FirstStart, default);
        await Task.Delay(TimeSpan.FromSeconds(3));
        Assert.False(second.IsCompleted, second.Exception?.ToString() ?? "the second instance got the lock while the first held it");
        first.Dispose();
        (await second.WaitAsync(TwoInstances.Patience)).Dispose();
    }
}
