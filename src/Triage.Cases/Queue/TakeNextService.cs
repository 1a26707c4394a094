using Microsoft.EntityFrameworkCore;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.Queue;

public sealed record TakenCase(int CaseId, string ClaimNumber, int RiskScore);

/// <summary>
/// "Take next": gives the caller the riskiest unassigned open case on their lines. The case's concurrency
/// token makes the save a conditional UPDATE, so when two people pick the same case at once only one save
/// lands; the other sees the case as stale and picks again. On SQLite the pick and the save share one write
/// turn, so a burst of takers queues instead of losing the same race in lockstep.
/// </summary>
public sealed class TakeNextService(TriageDbContext db, TimeProvider clock, CaseEvents events, SqliteWriteTurns turns)
{
    /// <summary>Enough for every contender in a burst to lose several races and still get a case.</summary>
    public const int MaxAttempts = 50;

    /// <returns>The case now assigned to the caller, or null when no unassigned case matches their lines.</returns>
    public async Task<TakenCase?> TakeNextAsync(Actor actor, CancellationToken ct = default)
    {
        actor.Require("take the next case", Roles.Investigator);
        for (var attempt = 1; attempt <= MaxAttempts; attempt++)
        {
            // Nothing stale from a lost race stays tracked.
            db.ChangeTracker.Clear();
            await using var turn = await turns.TakeAsync(db, ct);
            await using var tx = await db.Database.BeginTransactionAsync(ct);
            var user = await db.Users.SingleOrDefaultAsync(u => u.Id == actor.UserId, ct)
                ?? throw new AccessDeniedException($"{actor.UserName} has no account in this store.");
            // Absence is the lead's plan for the day; the person asks to be marked present rather than overriding it.
            if (user.IsAbsent)
                throw new DomainRuleException($"You are marked absent since {user.AbsentSince:d MMM}, so take next hands you nothing; ask a team lead to mark you present.");
            var lines = user.LineList.ToList();
            if (lines.Count == 0) throw new DomainRuleException($"{user.DisplayName} has no lines of business, so no case can be taken.");
            var next = await db.Cases
                .Where(c => c.AssigneeId == null && c.IsOpen && lines.Contains(c.Line))
                .OrderByDescending(c => c.Probability).ThenByDescending(c => c.Id)
                .FirstOrDefaultAsync(ct);
            if (next is null) return null;
            next.AssignTo(user, actor, clock.GetUtcNow().UtcDateTime, "take next");
            try
            {
                await db.SaveChangesAsync(ct);
                await tx.CommitAsync(ct);
                events.Publish(next.Id, "case.assigned");
                return new TakenCase(next.Id, next.ClaimNumber, next.RiskScore);
            }
            catch (StaleCaseException) when (attempt < MaxAttempts)
            {
                // Someone else took it first: pick again from what is left.
            }
        }
        throw new InvalidOperationException($"No case could be taken after {MaxAttempts} attempts; the queue is too busy, try again.");
    }
}
