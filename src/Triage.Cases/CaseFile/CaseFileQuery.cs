using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.CaseFile;

/// <summary>A driver with what to check for it: the case's check items for a raising driver,
/// the playbook's suggestions for a lowering one.</summary>
public sealed record DriverWithChecks(DriverSnapshot Driver, IReadOnlyList<CheckItem> Checks, IReadOnlyList<PlaybookCheck> Suggestions);

/// <summary>What a page saw when it loaded a case: changes are refused unless the case is still at this
/// version, and audit events after <paramref name="LastAuditId"/> say what changed meanwhile.</summary>
public sealed record CaseStamp(Guid Version, long LastAuditId);

/// <summary>Where an open case stands among all open cases, riskiest first (1 = riskiest).</summary>
public sealed record QueueRank(int Rank, int OpenCases);

public sealed record CaseFileView(Case Case, Claim Claim, IReadOnlyList<DriverWithChecks> Raising, IReadOnlyList<DriverWithChecks> Lowering,
    QueueRank? Rank, CaseStamp Stamp, IReadOnlyList<AssignmentChange> Assignments);

/// <summary>Everything the case page and the case report show, read without tracking.</summary>
public sealed class CaseFileQuery(TriageDbContext db)
{
    public async Task<CaseFileView?> GetAsync(int caseId, CancellationToken ct = default)
    {
        var c = await db.Cases.AsNoTracking().AsSplitQuery()
            .Include(x => x.Claim).Include(x => x.Assignee).Include(x => x.Drivers).Include(x => x.Checks)
            .Include(x => x.Notes).Include(x => x.Verdicts).Include(x => x.SupersededDrivers)
            .SingleOrDefaultAsync(x => x.Id == caseId, ct);
        if (c?.Claim is null) return null;
        var lastAudit = await db.AuditEvents.Where(a => a.CaseId == caseId).MaxAsync(a => (long?)a.Id, ct) ?? 0;
        QueueRank? rank = null;
        if (c.IsOpen)
        {
            var higher = await db.Cases.CountAsync(x => x.IsOpen && x.Probability > c.Probability, ct);
            rank = new QueueRank(higher + 1, await db.Cases.CountAsync(x => x.IsOpen, ct));
        }
        var lowersRules = await db.PlaybookRules.AsNoTracking().Where(r => r.Direction == DriverDirection.Lowers).ToListAsync(ct);
        var values = c.ScoredValues();
        var drivers = c.Drivers.OrderBy(d => d.Rank).ToList();
        var raising = drivers.Where(d => d.Raises)
            .Select(d => new DriverWithChecks(d, c.Checks.Where(k => k.DriverField == d.Field).OrderBy(k => k.Order).ToList(), []))
            .ToList();
        var lowering = drivers.Where(d => d.Contribution < 0).OrderBy(d => d.Contribution)
            .Select(d => new DriverWithChecks(d, [], lowersRules.Where(r => r.Matches(d, values)).SelectMany(r => r.Checks).ToList()))
            .ToList();
        var assignments = await AssignmentHistory.ForCaseAsync(db, caseId, ct);
        return new CaseFileView(c, c.Claim, raising, lowering, rank, new CaseStamp(c.Version, lastAudit), assignments);
    }
}
