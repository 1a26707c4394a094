using Microsoft.EntityFrameworkCore;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.TeamLead;

/// <summary>A case as the lead saw it: the request is refused if its version moved on since.</summary>
public sealed record CaseSeen(int CaseId, Guid Version);

/// <summary>The whole request was refused; <see cref="Reasons"/> names each case and what stands in the way. Nothing was saved.</summary>
public sealed class ReassignRefusedException(IReadOnlyList<string> reasons)
    : Exception("Nothing was reassigned: " + string.Join(" ", reasons))
{
    public IReadOnlyList<string> Reasons { get; } = reasons;
}

/// <summary>Team lead moves cases between investigators, all or nothing, in one save (one transaction).</summary>
public sealed class ReassignService(TriageDbContext db, CaseEvents events, TimeProvider clock)
{
    public async Task ReassignAsync(IReadOnlyList<CaseSeen> seen, string toUserId, string reason, Actor actor, CancellationToken ct = default)
    {
        actor.Require("reassign cases", Roles.TeamLead, Roles.Admin);
        if (seen.Count == 0) throw new DomainRuleException("Select at least one case to reassign.");
        if (string.IsNullOrWhiteSpace(reason)) throw new DomainRuleException("A reassignment needs a reason.");
        var to = await db.Users.SingleOrDefaultAsync(u => u.Id == toUserId, ct)
            ?? throw new DomainRuleException($"There is no investigator with id {toUserId}.");
        var ids = seen.Select(s => s.CaseId).ToList();
        var cases = await db.Cases.Include(c => c.Assignments).Where(c => ids.Contains(c.Id)).ToDictionaryAsync(c => c.Id, ct);
        var now = clock.GetUtcNow().UtcDateTime;
        var refusals = new List<string>();
        foreach (var s in seen)
        {
            if (!cases.TryGetValue(s.CaseId, out var c)) { refusals.Add($"Case {s.CaseId} no longer exists."); continue; }
            if (c.Version != s.Version) { refusals.Add(Changed(c)); continue; }
            try { c.AssignTo(to, actor, now, reason.Trim()); }
            catch (DomainRuleException e) { refusals.Add(e.Message); }
        }
        if (refusals.Count > 0) throw new ReassignRefusedException(refusals);
        try
        {
            await db.SaveChangesAsync(ct);
        }
        catch (StaleCaseException)
        {
            // Someone saved one of the cases between our read and our write; the whole save rolled back.
            db.ChangeTracker.Clear();
            var fresh = await db.Cases.AsNoTracking().Where(c => ids.Contains(c.Id)).ToListAsync(ct);
            throw new ReassignRefusedException(fresh.Where(c => seen.Single(s => s.CaseId == c.Id).Version != c.Version).Select(Changed).ToList());
        }
        foreach (var id in ids) events.Publish(id, "case.assigned");
    }

    private static string Changed(Case c) => c.Status == CaseStatus.Closed
        ? $"Case {c.ClaimNumber} was closed meanwhile."
        : $"Case {c.ClaimNumber} changed meanwhile (now {(c.AssigneeName is null ? "unassigned" : $"with {c.AssigneeName}")}).";
}
