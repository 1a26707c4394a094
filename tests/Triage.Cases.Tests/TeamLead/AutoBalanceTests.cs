using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.TeamLead.TeamStore;

namespace Triage.Cases.Tests.TeamLead;

public sealed class AutoBalanceTests
{
    // Ines: motor+home, 3 a day, one taken today (2 left). Tomas: travel, 2. Lin: home, 1. Kit: motor+marine, absent.
    // Pool: travel 95; motor 90, 80, 70, 60; home 85, 50; marine 40; pet 30.
    private static async Task<Dictionary<string, int>> SeedAsync(TestStore store)
    {
        await using var db = await store.MigratedAsync();
        var ines = Person("ines", "motor,home", 3);
        var kit = Person("kit", "motor,marine", 5);
        kit.MarkAbsent(Build.Now.AddDays(-1), "leave");
        await AddPeopleAsync(db, (ines, []), (Person("tomas", "travel", 2), []), (Person("lin", "home", 1), []), (kit, []),
            (Person("lead"), [Roles.TeamLead]));
        var taken = Build.Case(0.99, "motor");
        taken.AssignTo(ines, Actor.System, Build.Now);
        db.Cases.Add(taken);
        var pool = new Dictionary<string, Case>
        {
            ["travel95"] = Build.Case(0.95, "travel"), ["motor90"] = Build.Case(0.90, "motor"), ["motor80"] = Build.Case(0.80, "motor"),
            ["motor70"] = Build.Case(0.70, "motor"), ["motor60"] = Build.Case(0.60, "motor"), ["home85"] = Build.Case(0.85, "home"),
            ["home50"] = Build.Case(0.50, "home"), ["marine40"] = Build.Case(0.40, "marine"), ["pet30"] = Build.Case(0.30, "pet"),
        };
        db.Cases.AddRange(pool.Values);
        await db.SaveChangesAsync();
        return pool.ToDictionary(p => p.Key, p => p.Value.Id);
    }

    private static AutoBalanceService Balance(TestStore store) => Service<AutoBalanceService>(store);

    [Fact]
    public async Task Plans_riskiest_first_to_present_people_on_the_line_with_capacity_and_says_what_stays_and_why()
    {
        await using var store = TestStore.Create();
        var ids = await SeedAsync(store);

        var plan = await Balance(store).PlanAsync(Lead);

        Assert.Equal(
        [
            (ids["travel95"], "id-tomas"), (ids["motor90"], "id-ines"),
            // Ines and Lin both have one left; Lin holds fewer open cases.
            (ids["home85"], "id-lin"), (ids["motor80"], "id-ines"),
        ], plan.Cases.Select(c => (c.CaseId, c.ToUserId)));
        Assert.Equal([("INES", 2, 2), ("KIT", 0, 0), ("LIN", 1, 1), ("TOMAS", 2, 1)],
            plan.Shares.Select(s => (s.Name, s.RemainingBefore, s.Gets)));
        Assert.True(plan.Shares.Single(s => s.Name == "KIT").Absent);
        Assert.Equal(
        [
            ("home", 1, "No capacity left today among the 2 present investigators who work home claims."),
            ("marine", 1, "Everyone who works marine claims is marked absent."),
            ("motor", 2, "INES, the one present investigator who works motor claims, has no capacity left today."),
            ("pet", 1, "Nobody on the team works pet claims."),
        ], plan.Left.Select(l => (l.Line, l.Cases, l.Why)));

        await using var before = store.NewContext();
        Assert.Equal(9, await before.Cases.CountAsync(c => c.AssigneeId == null));
    }

    [Fact]
    public async Task Applying_assigns_the_whole_plan_with_history_audit_and_live_notices()
    {
        await using var store = TestStore.Create();
        await SeedAsync(store);
        var plan = await Balance(store).PlanAsync(Lead);
        var heard = new List<CaseChanged>();
        using var _ = store.Host.Services.GetRequiredService<CaseEvents>().Subscribe(heard.Add);

        Assert.Equal(4, await Balance(store).ApplyAsync(plan, Lead));

        await using var db = store.NewContext();
        foreach (var p in plan.Cases)
        {
            var c = await db.Cases.Include(x => x.Assignments).Include(x => x.Audit).SingleAsync(x => x.Id == p.CaseId);
            Assert.Equal(p.ToUserId, c.AssigneeId);
            Assert.Equal(("lead", AutoBalanceService.Reason), (Assert.Single(c.Assignments).By, c.Assignments[0].Reason));
            Assert.Contains(c.Audit, a => a.What == "case.assigned");
        }
        Assert.Contains(await db.AuditEvents.ToListAsync(), a => a is { What: "pool.balanced", Who: "lead" } && a.Detail!.StartsWith("4 cases to 3"));
        Assert.Equal(plan.Cases.Select(c => c.CaseId).Order(), heard.Select(h => h.CaseId).Order());
        // Everyone present is at capacity now: a new plan hands out nothing.
        Assert.Empty((await Balance(store).PlanAsync(Lead)).Cases);
    }

    [Fact]
    public async Task A_planned_case_taken_meanwhile_refuses_the_whole_plan()
    {
        await using var store = TestStore.Create();
        await SeedAsync(store);
        var plan = await Balance(store).PlanAsync(Lead);
        await Service<TakeNextService>(store).TakeNextAsync(Investigator("tomas"));

        var e = await Assert.ThrowsAsync<ReassignRefusedException>(() => Balance(store).ApplyAsync(plan, Lead));

        Assert.StartsWith("Nothing was handed out", e.Message);
        Assert.EndsWith("changed meanwhile (now with TOMAS).", Assert.Single(e.Reasons));
        await using var db = store.NewContext();
        Assert.Equal(1, await db.Set<Assignment>().CountAsync(a => a.Reason == "take next"));
        Assert.Equal(0, await db.Set<Assignment>().CountAsync(a => a.Reason == AutoBalanceService.Reason));
    }

    [Fact]
    public async Task A_case_coming_into_the_pool_or_a_recipient_marked_absent_refuses_the_plan()
    {
        await using var store = TestStore.Create();
        await SeedAsync(store);
        var plan = await Balance(store).PlanAsync(Lead);
        await using (var db = store.NewContext())
        {
            db.Cases.Add(Build.Case(0.97, "travel"));
            await db.SaveChangesAsync();
        }
        await Service<AbsenceService>(store).MarkAbsentAsync("id-lin", "sick", Lead);

        var e = await Assert.ThrowsAsync<ReassignRefusedException>(() => Balance(store).ApplyAsync(plan, Lead));

        Assert.Equal(
        [
            "1 case came into the pool since the plan was made, so it may no longer give the riskiest first.",
            "LIN was marked absent since the plan was made.",
        ], e.Reasons);
        await using var after = store.NewContext();
        Assert.Equal(0, await after.Set<Assignment>().CountAsync(a => a.Reason == AutoBalanceService.Reason));

        // A fresh plan skips Lin and starts with the new case.
        var again = await Balance(store).PlanAsync(Lead);
        Assert.DoesNotContain(again.Cases, c => c.ToUserId == "id-lin");
        Assert.Equal((97, "id-tomas"), (again.Cases[0].RiskScore, again.Cases[0].ToUserId));
        Assert.Equal(4, await Balance(store).ApplyAsync(again, Lead));
    }

    [Fact]
    public async Task Returning_a_case_to_the_pool_after_planning_is_a_change_too()
    {
        await using var store = TestStore.Create();
        await SeedAsync(store);
        var plan = await Balance(store).PlanAsync(Lead);
        await Service<ReassignService>(store).ReturnAllToPoolAsync("id-ines", "back", Lead);
        var e = await Assert.ThrowsAsync<ReassignRefusedException>(() => Balance(store).ApplyAsync(plan, Lead));
        Assert.Contains("1 case came into the pool", e.Reasons[0]);
    }

    [Fact]
    public async Task Only_team_leads_and_admins_balance()
    {
        await using var store = TestStore.Create();
        await SeedAsync(store);
        await Assert.ThrowsAsync<AccessDeniedException>(() => Balance(store).PlanAsync(Manager));
        await Assert.ThrowsAsync<AccessDeniedException>(() => Balance(store).PlanAsync(Investigator("ines")));
        var plan = await Balance(store).PlanAsync(Lead);
        await Assert.ThrowsAsync<AccessDeniedException>(() => Balance(store).ApplyAsync(plan, Investigator("ines")));
    }

    // The plan is applied while the team presses take next and another lead moves a planned case:
    // whatever wins, no case is held twice, none disappears, and every case's history ends where it is.
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Applying_under_concurrent_take_next_and_reassignment_assigns_no_case_twice_and_loses_none(string provider)
    {
        await using var store = TestStore.Create(provider);
        var team = Enumerable.Range(0, 6).Select(i => Person($"inv{i}", "motor,home,travel", 6)).ToList();
        await using (var db = await store.MigratedAsync())
        {
            await AddPeopleAsync(db, [.. team.Select(u => (u, Array.Empty<string>()))]);
            db.Cases.AddRange(Enumerable.Range(0, 60).Select(i => Build.Case(0.2 + i * 0.012, new[] { "motor", "home", "travel" }[i % 3])));
            await db.SaveChangesAsync();
        }
        for (var round = 0; round < 3; round++)
        {
            int BalancedSoFar() { using var db = store.NewContext(); return db.Set<Assignment>().Count(a => a.Reason == AutoBalanceService.Reason); }
            var before = BalancedSoFar();
            var plan = await Balance(store).PlanAsync(Lead);
            if (plan.Cases.Count == 0) break; // take next ignores capacity, so earlier rounds may have used it all
            var firstPlanned = plan.Cases[0].Seen;
            using var start = new Barrier(4);
            var apply = Task.Run(async () =>
            {
                start.SignalAndWait();
                try { return await Balance(store).ApplyAsync(plan, Lead); }
                catch (ReassignRefusedException) { return 0; }
            });
            var takers = team.Take(2).Select(u => Task.Run(async () =>
            {
                start.SignalAndWait();
                for (var i = 0; i < 2; i++) await Service<TakeNextService>(store).TakeNextAsync(Investigator(u.UserName!));
            })).ToList();
            var mover = Task.Run(async () =>
            {
                start.SignalAndWait();
                try { await Service<ReassignService>(store).ReassignAsync([firstPlanned], team[5].Id, "urgent", Lead); }
                catch (ReassignRefusedException) { }
            });
            await Task.WhenAll([apply, mover, .. takers]);
            Assert.True(apply.Result is 0 || apply.Result == plan.Cases.Count);
            Assert.Equal(before + apply.Result, BalancedSoFar());

            await using var db = store.NewContext();
            var cases = await db.Cases.Include(c => c.Assignments).ToListAsync();
            Assert.Equal(60, cases.Count);
            Assert.All(cases, c => Assert.Equal(c.AssigneeId, c.Assignments.OrderBy(a => a.Id).LastOrDefault()?.ToUserId));
            if (apply.Result > 0)
                Assert.All(plan.Cases, p => Assert.Equal(p.ToUserId, cases.Single(c => c.Id == p.CaseId).AssigneeId));
        }
        await using var end = store.NewContext();
        var balanced = await end.Set<Assignment>().Where(a => a.Reason == AutoBalanceService.Reason).ToListAsync();
        Assert.Equal(balanced.Count, balanced.Select(a => a.CaseId).Distinct().Count());
    }

    // Two leads apply the same plan at once while two investigators take travel cases the plan does not touch:
    // the plan lands exactly once, whole, and the unrelated take next does not block it.
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Two_leads_applying_one_plan_at_once_apply_it_once_beside_unrelated_take_next(string provider)
    {
        await using var store = TestStore.Create(provider);
        var recipients = Enumerable.Range(0, 4).Select(i => Person($"rec{i}", "motor,home", 5)).ToList();
        // No capacity left for the plan, but take next is theirs to press.
        var takers = Enumerable.Range(0, 2).Select(i => Person($"trv{i}", "travel", 0)).ToList();
        await using (var db = await store.MigratedAsync())
        {
            await AddPeopleAsync(db, [.. recipients.Concat(takers).Select(u => (u, Array.Empty<string>()))]);
            db.Cases.AddRange(Enumerable.Range(0, 45).Select(i => Build.Case(0.2 + i * 0.015, new[] { "motor", "home", "travel" }[i % 3])));
            await db.SaveChangesAsync();
        }
        var plan = await Balance(store).PlanAsync(Lead);
        Assert.Equal(20, plan.Cases.Count);
        Assert.DoesNotContain(plan.Cases, c => c.Line == "travel");

        using var start = new Barrier(4);
        var applies = Enumerable.Range(0, 2).Select(_ => Task.Run(async () =>
        {
            start.SignalAndWait();
            try { return await Balance(store).ApplyAsync(plan, Lead); }
            catch (ReassignRefusedException) { return 0; }
        })).ToList();
        var takes = takers.Select(u => Task.Run(async () =>
        {
            start.SignalAndWait();
            var got = 0;
            for (var i = 0; i < 3; i++) if (await Service<TakeNextService>(store).TakeNextAsync(Investigator(u.UserName!)) is not null) got++;
            return got;
        })).ToList();
        await Task.WhenAll([.. applies, .. takes]);

        Assert.Equal([0, 20], applies.Select(a => a.Result).Order());
        Assert.All(takes, t => Assert.Equal(3, t.Result));
        await using var check = store.NewContext();
        var cases = await check.Cases.Include(c => c.Assignments).ToListAsync();
        Assert.All(plan.Cases, p => Assert.Single(cases.Single(c => c.Id == p.CaseId).Assignments));
        Assert.All(plan.Cases, p => Assert.Equal(p.ToUserId, cases.Single(c => c.Id == p.CaseId).AssigneeId));
        Assert.Equal(6, cases.Count(c => c.AssigneeId is "id-trv0" or "id-trv1"));
        Assert.Equal(45 - 26, cases.Count(c => c.AssigneeId is null));
    }
}
