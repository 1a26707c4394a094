using Microsoft.EntityFrameworkCore;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.TeamLead;

public sealed record PlannedCase(int CaseId, Guid Version, string ClaimNumber, string Line, int RiskScore, string ToUserId, string ToName)
{
    public CaseSeen Seen => new(CaseId, Version);
}

/// <summary>What one investigator gets from the plan; <see cref="RemainingBefore"/> is today's capacity left when it was made.</summary>
public sealed record PlannedShare(string UserId, string Name, bool Absent, int RemainingBefore, int Gets);

/// <summary>Pool cases of one line the plan leaves unassigned, and why.</summary>
public sealed record LeftInPool(string Line, int Cases, string Why);

/// <summary>
/// A proposed hand-out of the pool. The marks record what the pool looked like: a case opened after
/// <see cref="CaseMark"/> or returned to the pool after <see cref="AssignmentMark"/> means the plan is out of date.
/// </summary>
public sealed record BalancePlan(DateTime MadeAt, IReadOnlyList<PlannedCase> Cases, IReadOnlyList<PlannedShare> Shares,
    IReadOnlyList<LeftInPool> Left, int CaseMark, int AssignmentMark);

/// <summary>
/// Auto-balance: hands the unassigned pool out, riskiest case first, to present investigators who work the
/// case's line and still have capacity today (daily capacity minus cases taken today, <see cref="PersonLoad"/>).
/// Each case goes to the eligible person with the most capacity left (ties: fewer open cases, then name), so
/// the day's work spreads evenly rather than filling one person first. The plan is shown first; applying it
/// re-checks everything and saves all of it in one transaction, or nothing.
/// </summary>
public sealed class AutoBalanceService(TriageDbContext db, CaseEvents events, TimeProvider clock)
{
    public const string Reason = "auto-balance";

    public async Task<BalancePlan> PlanAsync(Actor actor, CancellationToken ct = default)
    {
        actor.Require("auto-balance the pool", ReassignService.Movers);
        var now = clock.GetUtcNow().UtcDateTime;
        // Marks first: anything that reaches the pool after them is seen on apply, never silently missed.
        var caseMark = await db.Cases.MaxAsync(c => (int?)c.Id, ct) ?? 0;
        var assignmentMark = await db.Set<Assignment>().MaxAsync(a => (int?)a.Id, ct) ?? 0;
        var loads = await TeamLoad.LoadAsync(db, TeamDay.Of(now), ct);
        var poolByLine = await db.Cases.Where(c => c.IsOpen && c.AssigneeId == null)
            .GroupBy(c => c.Line).Select(g => new { Line = g.Key, Count = g.Count() }).ToDictionaryAsync(x => x.Line, x => x.Count, ct);

        var remaining = loads.ToDictionary(l => l.User.Id, l => l.RemainingToday);
        // At most the covering people's capacity can be placed per line, so only that many riskiest cases are read.
        var candidates = new List<(int Id, Guid Version, string Number, string Line, int Risk, double P)>();
        foreach (var (line, _) in poolByLine)
        {
            var room = loads.Where(l => l.User.Covers(line)).Sum(l => l.RemainingToday);
            if (room == 0) continue;
            candidates.AddRange((await db.Cases.AsNoTracking().Where(c => c.IsOpen && c.AssigneeId == null && c.Line == line)
                .OrderByDescending(c => c.Probability).ThenByDescending(c => c.Id).Take(room)
                .Select(c => new { c.Id, c.Version, c.ClaimNumber, c.Line, c.RiskScore, c.Probability })
                .ToListAsync(ct)).Select(c => (c.Id, c.Version, c.ClaimNumber, c.Line, c.RiskScore, c.Probability)));
        }

        var open = loads.ToDictionary(l => l.User.Id, l => l.Open);
        var planned = new List<PlannedCase>();
        foreach (var c in candidates.OrderByDescending(c => c.P).ThenByDescending(c => c.Id))
        {
            var who = loads.Where(l => remaining[l.User.Id] > 0 && l.User.Covers(c.Line))
                .OrderByDescending(l => remaining[l.User.Id]).ThenBy(l => open[l.User.Id]).ThenBy(l => l.User.DisplayName, StringComparer.Ordinal)
                .FirstOrDefault();
            if (who is null) continue;
            remaining[who.User.Id]--;
            open[who.User.Id]++;
            planned.Add(new PlannedCase(c.Id, c.Version, c.Number, c.Line, c.Risk, who.User.Id, who.User.DisplayName));
        }

        var shares = loads.Select(l => new PlannedShare(l.User.Id, l.User.DisplayName, l.User.IsAbsent, l.RemainingToday,
            planned.Count(p => p.ToUserId == l.User.Id))).ToList();
        var left = poolByLine.OrderBy(p => p.Key, StringComparer.Ordinal)
            .Select(p => (p.Key, Count: p.Value - planned.Count(c => c.Line == p.Key)))
            .Where(p => p.Count > 0)
            .Select(p => new LeftInPool(p.Key, p.Count, WhyLeft(p.Key, loads)))
            .ToList();
        return new BalancePlan(now, planned, shares, left, caseMark, assignmentMark);
    }

    private static string WhyLeft(string line, IReadOnlyList<PersonLoad> loads)
    {
        var covering = loads.Where(l => l.User.Covers(line)).ToList();
        if (covering.Count == 0) return $"Nobody on the team works {line} claims.";
        var present = covering.Where(l => !l.User.IsAbsent).ToList();
        if (present.Count == 0) return $"Everyone who works {line} claims is marked absent.";
        return present.Count == 1
            ? $"{present[0].User.DisplayName}, the one present investigator who works {line} claims, has no capacity left today."
            : $"No capacity left today among the {present.Count} present investigators who work {line} claims.";
    }

    /// <summary>Applies the plan whole, or refuses naming everything that changed since it was made; returns how many cases were handed out.</summary>
    public async Task<int> ApplyAsync(BalancePlan plan, Actor actor, CancellationToken ct = default)
    {
        actor.Require("auto-balance the pool", ReassignService.Movers);
        if (plan.Cases.Count == 0) throw new DomainRuleException("The plan hands out no cases; there is nothing to apply.");
        if (plan.Cases.Select(c => c.CaseId).Distinct().Count() != plan.Cases.Count) throw new DomainRuleException("The plan names a case twice.");
        const string headline = "Nothing was handed out; make a new plan";
        var refusals = new List<string>();

        var arrived = await db.Cases.CountAsync(c => c.IsOpen && c.AssigneeId == null && c.Id > plan.CaseMark, ct)
            + await db.Set<Assignment>().CountAsync(a => a.Id > plan.AssignmentMark && a.ToUserId == null, ct);
        if (arrived > 0)
            refusals.Add($"{arrived} case{(arrived == 1 ? "" : "s")} came into the pool since the plan was made, so it may no longer give the riskiest first.");

        var now = clock.GetUtcNow().UtcDateTime;
        var loads = (await TeamLoad.LoadAsync(db, TeamDay.Of(now), ct)).ToDictionary(l => l.User.Id);
        var refusedPeople = new HashSet<string>();
        foreach (var share in plan.Cases.GroupBy(c => c.ToUserId))
        {
            var name = share.First().ToName;
            var why = !loads.TryGetValue(share.Key, out var load) ? $"{name} is no longer an investigator."
                : load.User.IsAbsent ? $"{name} was marked absent since the plan was made."
                : load.RemainingToday < share.Count()
                    ? $"{name} can take {load.RemainingToday} more today, not the {share.Count()} planned (cases came to them since the plan was made)."
                    : null;
            if (why is null) continue;
            refusals.Add(why);
            refusedPeople.Add(share.Key);
        }

        var ids = plan.Cases.Select(c => c.CaseId).ToList();
        var cases = await db.Cases.Where(c => ids.Contains(c.Id)).ToDictionaryAsync(c => c.Id, ct);
        var userIds = plan.Cases.Select(c => c.ToUserId).Distinct().ToList();
        var users = await db.Users.Where(u => userIds.Contains(u.Id)).ToDictionaryAsync(u => u.Id, ct);
        foreach (var p in plan.Cases)
        {
            if (!cases.TryGetValue(p.CaseId, out var c)) { refusals.Add($"Case {p.ClaimNumber} no longer exists."); continue; }
            if (c.Version != p.Version) { refusals.Add(ReassignService.Changed(c)); continue; }
            if (refusedPeople.Contains(p.ToUserId) || !users.TryGetValue(p.ToUserId, out var to)) continue; // named above
            try { c.AssignTo(to, actor, now, Reason); }
            catch (DomainRuleException e) { refusals.Add(e.Message); }
        }
        if (refusals.Count > 0)
        {
            db.ChangeTracker.Clear();
            throw new ReassignRefusedException(refusals.Distinct().ToList(), headline);
        }

        db.AuditEvents.Add(new AuditEvent(actor.UserName, "pool.balanced",
            $"{plan.Cases.Count} cases to {userIds.Count} investigators: " +
            string.Join(", ", plan.Cases.GroupBy(c => c.ToName).Select(g => $"{g.Key} {g.Count()}")), now));
        await ReassignService.SaveAllOrNothingAsync(db, plan.Cases.Select(c => c.Seen).ToList(), headline, ct);
        foreach (var id in ids) events.Publish(id, "case.assigned");
        return plan.Cases.Count;
    }
}
