using Microsoft.EntityFrameworkCore;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.TeamLead;

/// <summary>A case as the lead saw it: the request is refused if its version moved on since.</summary>
public sealed record CaseSeen(int CaseId, Guid Version);

/// <summary>The whole request was refused; <see cref="Reasons"/> names each case or person and what stands in the way. Nothing was saved.</summary>
public sealed class ReassignRefusedException(IReadOnlyList<string> reasons, string headline = "Nothing was reassigned")
    : Exception(headline + ": " + string.Join(" ", reasons))
{
    public string Headline { get; } = headline;
    public IReadOnlyList<string> Reasons { get; } = reasons;
}

/// <summary>
/// Team lead moves cases to a named investigator or back to the unassigned pool, all or nothing, in one save
/// (one transaction). Every moved case gets a history entry and an audit event, and is announced so open
/// queue and case pages reload.
/// </summary>
public sealed class ReassignService(TriageDbContext db, CaseEvents events, TimeProvider clock)
{
    internal static readonly string[] Movers = [Roles.TeamLead, Roles.Admin];

    public async Task ReassignAsync(IReadOnlyList<CaseSeen> seen, string toUserId, string reason, Actor actor, CancellationToken ct = default)
    {
        actor.Require("reassign cases", Movers);
        var to = await InvestigatorAsync(toUserId, ct);
        await MoveAsync(seen, reason, (c, at, why) => c.AssignTo(to, actor, at, why), "case.assigned", ct);
    }

    public async Task ReturnToPoolAsync(IReadOnlyList<CaseSeen> seen, string reason, Actor actor, CancellationToken ct = default)
    {
        actor.Require("return cases to the pool", Movers);
        await MoveAsync(seen, reason, (c, at, why) => c.ReturnToPool(actor, at, why), "case.returned", ct);
    }

    /// <summary>Puts every open case the person holds back in the pool (typically when they are absent); returns how many.</summary>
    public async Task<int> ReturnAllToPoolAsync(string userId, string reason, Actor actor, CancellationToken ct = default)
    {
        actor.Require("return cases to the pool", Movers);
        var user = await db.Users.AsNoTracking().SingleOrDefaultAsync(u => u.Id == userId, ct)
            ?? throw new DomainRuleException($"There is no account with id {userId}.");
        var seen = await db.Cases.AsNoTracking().Where(c => c.IsOpen && c.AssigneeId == userId)
            .Select(c => new CaseSeen(c.Id, c.Version)).ToListAsync(ct);
        if (seen.Count == 0) throw new DomainRuleException($"{user.DisplayName} holds no open cases.");
        await MoveAsync(seen, reason, (c, at, why) => c.ReturnToPool(actor, at, why), "case.returned", ct);
        return seen.Count;
    }

    private async Task<TriageUser> InvestigatorAsync(string userId, CancellationToken ct)
    {
        var to = await db.Users.SingleOrDefaultAsync(u => u.Id == userId, ct)
            ?? throw new DomainRuleException($"There is no investigator with id {userId}.");
        var investigates = await (from ur in db.UserRoles
                                  join r in db.Roles on ur.RoleId equals r.Id
                                  where ur.UserId == userId && r.Name == Roles.Investigator
                                  select ur).AnyAsync(ct);
        return investigates ? to : throw new DomainRuleException($"{to.DisplayName} is not an investigator, so no case can go to them.");
    }

    private async Task MoveAsync(IReadOnlyList<CaseSeen> seen, string reason, Action<Case, DateTime, string> move, string what, CancellationToken ct)
    {
        if (seen.Count == 0) throw new DomainRuleException("Select at least one case.");
        if (string.IsNullOrWhiteSpace(reason)) throw new DomainRuleException("Moving cases needs a reason.");
        if (seen.Select(s => s.CaseId).Distinct().Count() != seen.Count) throw new DomainRuleException("The selection names a case twice.");
        var ids = seen.Select(s => s.CaseId).ToList();
        var cases = await db.Cases.Where(c => ids.Contains(c.Id)).ToDictionaryAsync(c => c.Id, ct);
        var now = clock.GetUtcNow().UtcDateTime;
        var refusals = new List<string>();
        foreach (var s in seen)
        {
            if (!cases.TryGetValue(s.CaseId, out var c)) { refusals.Add($"Case {s.CaseId} no longer exists."); continue; }
            if (c.Version != s.Version) { refusals.Add(Changed(c)); continue; }
            try { move(c, now, reason.Trim()); }
            catch (DomainRuleException e) { refusals.Add(e.Message); }
        }
        if (refusals.Count > 0)
        {
            // Nothing of the refused request may ride along with a later save on this context.
            db.ChangeTracker.Clear();
            throw new ReassignRefusedException(refusals);
        }
        await SaveAllOrNothingAsync(db, seen, "Nothing was reassigned", ct);
        foreach (var id in ids) events.Publish(id, what);
    }

    /// <summary>Saves in one transaction; when any case was saved by someone else in between, refuses naming each one.</summary>
    internal static async Task SaveAllOrNothingAsync(TriageDbContext db, IReadOnlyList<CaseSeen> seen, string headline, CancellationToken ct)
    {
        try
        {
            await db.SaveChangesAsync(ct);
        }
        catch (StaleCaseException)
        {
            // Someone saved one of the cases between our read and our write; the whole save rolled back.
            db.ChangeTracker.Clear();
            var ids = seen.Select(s => s.CaseId).ToList();
            var versions = seen.ToDictionary(s => s.CaseId, s => s.Version);
            var fresh = await db.Cases.AsNoTracking().Where(c => ids.Contains(c.Id)).ToListAsync(ct);
            var changed = fresh.Where(c => versions[c.Id] != c.Version).Select(Changed).ToList();
            throw new ReassignRefusedException(changed.Count > 0 ? changed : ["A case changed while saving; reload and try again."], headline);
        }
    }

    internal static string Changed(Case c) => c.Status == CaseStatus.Closed
        ? $"Case {c.ClaimNumber} was closed meanwhile."
        : $"Case {c.ClaimNumber} changed meanwhile (now {(c.AssigneeName is null ? "unassigned" : $"with {c.AssigneeName}")}).";
}
