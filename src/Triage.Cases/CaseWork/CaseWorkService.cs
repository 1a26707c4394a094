using Microsoft.EntityFrameworkCore;
using Triage.Cases.CaseFile;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.CaseWork;

/// <summary>What an investigator found, as the verdict form sends it.</summary>
public sealed record VerdictInput(VerdictOutcome Outcome, string Reason, string? Note, double? AmountSaved);

/// <summary>The case changed after the caller loaded it; the message says what changed. Nothing was saved.</summary>
public sealed class CaseChangedException(string message) : Exception(message);

public sealed class CaseNotFoundException(int caseId) : Exception($"There is no case {caseId}.");

/// <summary>
/// Working one case: reading it, ticking checks, notes and verdicts. Every call checks the caller's
/// roles here (not in the page), refuses to act on a case that changed since the caller's
/// <see cref="CaseStamp"/>, writes the audit trail and tells open pages through <see cref="CaseEvents"/>.
/// </summary>
public sealed class CaseWorkService(TriageDbContext db, CaseFileQuery files, CaseEvents events, TimeProvider clock)
{
    private const string FileOpened = "case.file-opened";
    private const string ReportDownloaded = "report.downloaded";
    private static readonly string[] Readers = [Roles.TeamLead, Roles.Manager, Roles.Analyst, Roles.Admin];

    private DateTime Now => clock.GetUtcNow().UtcDateTime;

    /// <summary>The case file for the case page; writes "case file opened" to the audit trail.</summary>
    public Task<CaseFileView> OpenAsync(int caseId, Actor actor, CancellationToken ct = default) =>
        ReadAsync(caseId, actor, "open a case", FileOpened, ct);

    /// <summary>The case file for the PDF report; writes "report downloaded" to the audit trail.</summary>
    public Task<CaseFileView> ReportAsync(int caseId, Actor actor, CancellationToken ct = default) =>
        ReadAsync(caseId, actor, "download a case report", ReportDownloaded, ct);

    /// <summary>Reads the case again for a page already showing it (after a change); not audited a second time.</summary>
    public Task<CaseFileView> ReloadAsync(int caseId, Actor actor, CancellationToken ct = default) =>
        ReadAsync(caseId, actor, "open a case", null, ct);

    public Task TickCheckAsync(int caseId, int checkId, string? note, CaseStamp seen, Actor actor, CancellationToken ct = default) =>
        ChangeAsync(caseId, seen, actor, "tick a check", [Roles.Investigator], c =>
        {
            RefuseUnlessAssignee(c, actor);
            c.StartWorkBy(actor);
            c.CompleteCheck(checkId, actor, Now, string.IsNullOrWhiteSpace(note) ? null : note.Trim());
            return "check.done";
        }, ct);

    public Task UntickCheckAsync(int caseId, int checkId, CaseStamp seen, Actor actor, CancellationToken ct = default) =>
        ChangeAsync(caseId, seen, actor, "reopen a check", [Roles.Investigator], c =>
        {
            RefuseUnlessAssignee(c, actor);
            c.ReopenCheck(checkId, actor, Now);
            return "check.reopened";
        }, ct);

    /// <summary>The assignee, a team lead or a manager may add a note; the assignee's first note starts the review.</summary>
    public Task AddNoteAsync(int caseId, string text, CaseStamp seen, Actor actor, CancellationToken ct = default) =>
        ChangeAsync(caseId, seen, actor, "add a note", [Roles.Investigator, Roles.TeamLead, Roles.Manager], c =>
        {
            if (!actor.IsIn(Roles.TeamLead) && !actor.IsIn(Roles.Manager)) RefuseUnlessAssignee(c, actor);
            c.StartWorkBy(actor);
            c.AddNote(text, actor, Now);
            return "note.added";
        }, ct);

    /// <summary>Only the assignee records the verdict; it closes the case.</summary>
    public Task RecordVerdictAsync(int caseId, VerdictInput v, CaseStamp seen, Actor actor, CancellationToken ct = default) =>
        ChangeAsync(caseId, seen, actor, "record a verdict", [Roles.Investigator], c =>
        {
            RefuseUnlessAssignee(c, actor);
            VerdictReasons.Require(v.Outcome, v.Reason);
            c.StartWorkBy(actor);
            c.RecordVerdict(v.Outcome, v.Reason, Trimmed(v.Note), v.AmountSaved, actor, Now);
            return "verdict.recorded";
        }, ct);

    /// <summary>The assignee or a team lead amends a verdict; the note must say why. The old verdict stays in the history.</summary>
    public Task AmendVerdictAsync(int caseId, VerdictInput v, CaseStamp seen, Actor actor, CancellationToken ct = default) =>
        ChangeAsync(caseId, seen, actor, "amend a verdict", [Roles.Investigator, Roles.TeamLead], c =>
        {
            if (!actor.IsIn(Roles.TeamLead)) RefuseUnlessAssignee(c, actor);
            if (Trimmed(v.Note) is null) throw new DomainRuleException("An amendment needs a reason: say in the note why the verdict changes.");
            VerdictReasons.Require(v.Outcome, v.Reason);
            c.AmendVerdict(v.Outcome, v.Reason, Trimmed(v.Note), v.AmountSaved, actor, Now);
            return "verdict.amended";
        }, ct);

    private async Task<CaseFileView> ReadAsync(int caseId, Actor actor, string action, string? auditWhat, CancellationToken ct)
    {
        actor.Require(action, [.. Roles.All]);
        var file = await files.GetAsync(caseId, ct) ?? throw new CaseNotFoundException(caseId);
        if (!Readers.Any(actor.IsIn) && file.Case.AssigneeId is { } owner && owner != actor.UserId)
            throw new AccessDeniedException(
                $"{actor.UserName} may not {action} {file.Case.ClaimNumber}: it is assigned to {file.Case.AssigneeName}.");
        if (auditWhat is null) return file;
        db.AuditEvents.Add(new AuditEvent(actor.UserName, auditWhat, null, Now, caseId));
        await db.SaveChangesAsync(ct);
        return file;
    }

    private async Task ChangeAsync(int caseId, CaseStamp seen, Actor actor, string action, string[] roles, Func<Case, string> change,
        CancellationToken ct)
    {
        actor.Require(action, roles);
        var c = await db.Cases.AsSplitQuery().Include(x => x.Claim).Include(x => x.Checks).Include(x => x.Verdicts)
            .SingleOrDefaultAsync(x => x.Id == caseId, ct) ?? throw new CaseNotFoundException(caseId);
        if (c.Version != seen.Version) throw new CaseChangedException(await DescribeChangesAsync(c, seen, ct));
        var what = change(c);
        try
        {
            await db.SaveChangesAsync(ct);
        }
        catch (StaleCaseException)
        {
            db.ChangeTracker.Clear();
            throw new CaseChangedException(await DescribeChangesAsync(c, seen, ct));
        }
        events.Publish(caseId, what);
    }

    private async Task<string> DescribeChangesAsync(Case c, CaseStamp seen, CancellationToken ct)
    {
        var changes = await db.AuditEvents.AsNoTracking()
            .Where(a => a.CaseId == c.Id && a.Id > seen.LastAuditId && a.What != FileOpened && a.What != ReportDownloaded)
            .OrderBy(a => a.Id).ToListAsync(ct);
        var said = changes.Count == 0 ? "someone else saved it" : string.Join("; ", changes.Select(Describe));
        return $"Case {c.ClaimNumber} changed after you opened it: {said}. Nothing of yours was saved; look at the case again and redo your change if it still applies.";
    }

    private static string Describe(AuditEvent a) => a.What switch
    {
        "case.assigned" => $"{a.Who} reassigned it {a.Detail}",
        "case.review-started" => $"{a.Who} started the review",
        "check.done" => $"{a.Who} ticked the check '{a.Detail}'",
        "check.reopened" => $"{a.Who} reopened the check '{a.Detail}'",
        "note.added" => $"{a.Who} added a note",
        "verdict.recorded" => $"{a.Who} recorded the verdict {a.Detail} and closed the case",
        "verdict.amended" => $"{a.Who} amended the verdict ({a.Detail})",
        _ => $"{a.Who}: {a.What} {a.Detail}".TrimEnd(),
    };

    private static void RefuseUnlessAssignee(Case c, Actor actor)
    {
        if (c.AssigneeId != actor.UserId)
            throw new AccessDeniedException(c.AssigneeId is null
                ? $"Case {c.ClaimNumber} is not assigned to anyone; take it from the queue before working on it."
                : $"Case {c.ClaimNumber} is assigned to {c.AssigneeName}; only they can work on it.");
    }

    private static string? Trimmed(string? s) => string.IsNullOrWhiteSpace(s) ? null : s.Trim();
}
