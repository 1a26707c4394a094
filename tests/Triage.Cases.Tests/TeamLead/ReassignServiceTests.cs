using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.TeamLead.TeamStore;

namespace Triage.Cases.Tests.TeamLead;

public sealed class ReassignServiceTests
{
    private static async Task<List<CaseSeen>> SeedAsync(TestStore store, int cases, string? heldBy = null)
    {
        await using var db = await store.MigratedAsync();
        await AddPeopleAsync(db, (Build.User("ines"), []), (Build.User("tomas"), []), (Build.User("kit"), []),
            (Build.User("piet"), [Roles.TeamLead]));
        var list = Enumerable.Range(0, cases).Select(i => Build.Case(0.2 + i * 0.01)).ToList();
        if (heldBy is not null)
        {
            var holder = await db.Users.SingleAsync(u => u.Id == heldBy);
            foreach (var c in list) c.AssignTo(holder, Actor.System, Build.Now.AddDays(-1));
        }
        db.Cases.AddRange(list);
        await db.SaveChangesAsync();
        return list.Select(c => new CaseSeen(c.Id, c.Version)).ToList();
    }

    private static ReassignService Reassign(TestStore store) => Service<ReassignService>(store);

    [Fact]
    public async Task One_changed_case_refuses_the_whole_request_and_names_it()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 3);
        await Reassign(store).ReassignAsync([seen[1]], "id-ines", "cover", Lead);
        var e = await Assert.ThrowsAsync<ReassignRefusedException>(() => Reassign(store).ReassignAsync(seen, "id-tomas", "balance", Lead));
        var only = Assert.Single(e.Reasons);
        Assert.Contains("changed meanwhile (now with INES)", only);
        await using var db = store.NewContext();
        Assert.Equal(2, await db.Cases.CountAsync(c => c.AssigneeId == null));
    }

    [Fact]
    public async Task Reassignment_is_in_the_history_and_the_audit_trail_and_announced()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 2);
        var heard = new List<CaseChanged>();
        using var _ = store.Host.Services.GetRequiredService<CaseEvents>().Subscribe(heard.Add);
        await Reassign(store).ReassignAsync(seen, "id-kit", "Ines is in court", Lead);
        await using var db = store.NewContext();
        var cases = await db.Cases.Include(c => c.Assignments).Include(c => c.Audit).ToListAsync();
        Assert.All(cases, c =>
        {
            Assert.Equal("id-kit", c.AssigneeId);
            Assert.Equal("Ines is in court", Assert.Single(c.Assignments).Reason);
            Assert.Contains(c.Audit, a => a.What == "case.assigned" && a.Who == "lead");
        });
        Assert.Equal(seen.Select(s => new CaseChanged(s.CaseId, "case.assigned")), heard);
    }

    [Fact]
    public async Task Returning_to_the_pool_unassigns_records_history_and_audit_and_announces()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 2, heldBy: "id-ines");
        var heard = new List<CaseChanged>();
        using var _ = store.Host.Services.GetRequiredService<CaseEvents>().Subscribe(heard.Add);
        await Reassign(store).ReturnToPoolAsync(seen, "Ines is on leave", Lead);
        await using var db = store.NewContext();
        var cases = await db.Cases.Include(c => c.Assignments).Include(c => c.Audit).ToListAsync();
        Assert.All(cases, c =>
        {
            Assert.Equal((null, null, CaseStatus.New), (c.AssigneeId, c.AssigneeName, c.Status));
            var back = c.Assignments.OrderBy(a => a.Id).Last();
            Assert.Equal(("id-ines", null, "lead", "Ines is on leave"), (back.FromUserId, back.ToUserId, back.By, back.Reason));
            Assert.Contains(c.Audit, a => a is { What: "case.returned", Who: "lead" } && a.Detail!.Contains("INES"));
        });
        Assert.Equal(seen.Select(s => new CaseChanged(s.CaseId, "case.returned")), heard);
    }

    [Fact]
    public async Task A_case_already_in_the_pool_refuses_the_whole_return()
    {
        await using var store = TestStore.Create();
        var held = await SeedAsync(store, 2, heldBy: "id-ines");
        await Reassign(store).ReturnToPoolAsync([held[0]], "first", Lead);
        await using (var db = store.NewContext())
            held[0] = new CaseSeen(held[0].CaseId, (await db.Cases.SingleAsync(c => c.Id == held[0].CaseId)).Version);
        var e = await Assert.ThrowsAsync<ReassignRefusedException>(() => Reassign(store).ReturnToPoolAsync(held, "again", Lead));
        Assert.Contains("already in the unassigned pool", Assert.Single(e.Reasons));
        await using var check = store.NewContext();
        Assert.Equal(1, await check.Cases.CountAsync(c => c.AssigneeId == "id-ines"));
    }

    [Fact]
    public async Task Returning_all_of_a_persons_open_cases_moves_every_one_or_none()
    {
        await using var store = TestStore.Create();
        await SeedAsync(store, 4, heldBy: "id-ines");
        Assert.Equal(4, await Reassign(store).ReturnAllToPoolAsync("id-ines", "absent", Lead));
        await using var db = store.NewContext();
        Assert.Equal(4, await db.Cases.CountAsync(c => c.AssigneeId == null));
        var e = await Assert.ThrowsAsync<DomainRuleException>(() => Reassign(store).ReturnAllToPoolAsync("id-ines", "absent", Lead));
        Assert.Contains("holds no open cases", e.Message);
    }

    [Fact]
    public async Task Refuses_a_target_who_is_not_an_investigator_is_absent_or_does_not_work_the_line_and_a_missing_reason()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 1);
        var s = Reassign(store);
        Assert.Contains("not an investigator", (await Assert.ThrowsAsync<DomainRuleException>(() => s.ReassignAsync(seen, "id-piet", "x", Lead))).Message);
        Assert.Contains("needs a reason", (await Assert.ThrowsAsync<DomainRuleException>(() => s.ReassignAsync(seen, "id-ines", " ", Lead))).Message);
        await Service<AbsenceService>(store).MarkAbsentAsync("id-ines", "training", Lead);
        var absent = await Assert.ThrowsAsync<ReassignRefusedException>(() => Reassign(store).ReassignAsync(seen, "id-ines", "x", Lead));
        Assert.Contains("INES is marked absent", Assert.Single(absent.Reasons));
        await using (var db = store.NewContext())
        {
            (await db.Users.SingleAsync(u => u.Id == "id-kit")).Lines = "travel";
            await db.SaveChangesAsync();
        }
        var line = await Assert.ThrowsAsync<ReassignRefusedException>(() => Reassign(store).ReassignAsync(seen, "id-kit", "x", Lead));
        Assert.Contains("does not work motor claims", Assert.Single(line.Reasons));
        await using var after = store.NewContext();
        Assert.Equal(0, await after.Set<Assignment>().CountAsync());
    }

    [Fact]
    public async Task Investigators_and_managers_may_not_move_cases()
    {
        await using var store = TestStore.Create();
        var seen = await SeedAsync(store, 1, heldBy: "id-ines");
        foreach (var who in new[] { Investigator("ines"), Manager })
        {
            await Assert.ThrowsAsync<AccessDeniedException>(() => Reassign(store).ReassignAsync(seen, "id-kit", "x", who));
            await Assert.ThrowsAsync<AccessDeniedException>(() => Reassign(store).ReturnToPoolAsync(seen, "x", who));
            await Assert.ThrowsAsync<AccessDeniedException>(() => Reassign(store).ReturnAllToPoolAsync("id-ines", "x", who));
        }
        var admin = new Actor("id-olu", "olu", new HashSet<string> { Roles.Admin });
        await Reassign(store).ReturnToPoolAsync(seen, "admin can", admin);
    }

    // Two leads move the same selection at once from the same view: exactly one wins, whole; no case is assigned twice or lost.
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Concurrent_reassignments_of_one_selection_apply_exactly_one(string provider)
    {
        await using var store = TestStore.Create(provider);
        var seen = await SeedAsync(store, 6);
        var targets = new[] { "id-ines", "id-tomas", "id-kit", "id-ines" };
        var results = await Task.WhenAll(targets.Select(t => Task.Run(async () =>
        {
            try { await Reassign(store).ReassignAsync(seen, t, "parallel", Lead); return t; }
            catch (ReassignRefusedException) { return null; }
        })));
        var winner = Assert.Single(results, r => r is not null);
        await using var db = store.NewContext();
        var cases = await db.Cases.Include(c => c.Assignments).ToListAsync();
        Assert.Equal(6, cases.Count);
        Assert.All(cases, c => { Assert.Equal(winner, c.AssigneeId); Assert.Single(c.Assignments); });
    }

    // A lead returns Ines's cases to the pool while she and others press take next: every case ends with exactly
    // one holder or in the pool, and its history agrees with where it is.
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Returning_to_the_pool_while_others_take_next_loses_nothing(string provider)
    {
        await using var store = TestStore.Create(provider);
        var held = await SeedAsync(store, 8, heldBy: "id-ines");
        await using (var db = store.NewContext())
        {
            db.Cases.AddRange(Enumerable.Range(0, 6).Select(i => Build.Case(0.5 + i * 0.01)));
            await db.SaveChangesAsync();
        }
        var returning = Task.Run(async () =>
        {
            try { await Reassign(store).ReturnToPoolAsync(held, "rebalance", Lead); return true; }
            catch (ReassignRefusedException) { return false; }
        });
        var takers = new[] { "tomas", "kit" }.Select(n => Task.Run(async () =>
        {
            var got = 0;
            for (var i = 0; i < 6; i++) if (await Service<TakeNextService>(store).TakeNextAsync(Investigator(n)) is not null) got++;
            return got;
        })).ToArray();
        await Task.WhenAll(takers);
        await returning;

        await using var check = store.NewContext();
        var cases = await check.Cases.Include(c => c.Assignments).ToListAsync();
        Assert.Equal(14, cases.Count);
        Assert.All(cases, c => Assert.Equal(c.AssigneeId, c.Assignments.OrderBy(a => a.Id).LastOrDefault()?.ToUserId));
        Assert.Equal(takers.Sum(t => t.Result), cases.Count(c => c.AssigneeId is "id-tomas" or "id-kit"));
        Assert.Equal(returning.Result ? 0 : 8, cases.Count(c => c.AssigneeId == "id-ines"));
    }
}
