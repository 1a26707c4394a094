using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.TeamLead;

/// <summary>
/// A team lead marks an investigator absent and back. While absent a person gets no cases: auto-balance
/// skips them, reassignment to them is refused and their own take next says why. Their open cases stay
/// with them until the lead returns them to the pool (<see cref="ReassignService.ReturnAllToPoolAsync"/>).
/// </summary>
public sealed class AbsenceService(TriageDbContext db, TimeProvider clock)
{
    public Task MarkAbsentAsync(string userId, string? note, Actor actor, CancellationToken ct = default) =>
        ChangeAsync(userId, actor, "user.absent", (u, now) => u.MarkAbsent(now, note), u => u.AbsenceNote, ct);

    public Task MarkPresentAsync(string userId, Actor actor, CancellationToken ct = default) =>
        ChangeAsync(userId, actor, "user.present", (u, _) => u.MarkPresent(), _ => null, ct);

    private async Task ChangeAsync(string userId, Actor actor, string what, Action<TriageUser, DateTime> change,
        Func<TriageUser, string?> detail, CancellationToken ct)
    {
        actor.Require("mark people absent or present", ReassignService.Movers);
        var user = await db.Users.SingleOrDefaultAsync(u => u.Id == userId, ct)
            ?? throw new DomainRuleException($"There is no account with id {userId}.");
        var now = clock.GetUtcNow().UtcDateTime;
        change(user, now);
        var note = detail(user);
        db.AuditEvents.Add(new AuditEvent(actor.UserName, what, user.UserName + (note is null ? "" : $": {note}"), now));
        try
        {
            await db.SaveChangesAsync(ct);
        }
        catch (DbUpdateConcurrencyException)
        {
            db.ChangeTracker.Clear();
            throw new DomainRuleException($"{user.DisplayName}'s account was changed by someone else meanwhile; reload the team page and try again.");
        }
    }
}
