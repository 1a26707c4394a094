using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Cases.Options;
using Triage.Cases.Queue;
using Triage.Cases.Store;
using Triage.Scoring;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;

namespace Triage.Cases.FirstStart;

/// <summary>
/// Gives the demo a closed-case history for the manager pages: the history claims of the holdout months
/// (which the first model did not train on) are scored, and those at or above the queue threshold, or drawn
/// for the audit sample, become cases worked through the normal rules and closed with the claim's outcome on its closed date.
/// </summary>
public sealed class HistoricCases(TriageDbContext db, IOptions<ScoringOptions> scoring, IOptions<QueueOptions> queue,
    TimeProvider clock, ILogger<HistoricCases> log)
{
    /// <summary>Share of verdicts turned inconclusive (seeded), so that path shows up in the figures.</summary>
    private const double InconclusiveShare = 0.08;
    private const int Seed = 7;

    public async Task CreateAsync(ClaimSchema schema, IReadOnlyList<SeedClaim> history, ScoringModel model,
        IReadOnlyList<(TriageUser User, TeamMember Member)> team, IReadOnlyList<PlaybookRule> playbook, CancellationToken ct)
    {
        var investigators = team.Where(t => t.Member.Roles.Contains(Roles.Investigator)).Select(t => t.User).ToList();
        var labelled = history.Where(h => h.Outcome is VerdictOutcome.ConfirmedFraud or VerdictOutcome.NotFraud).ToList();
        if (investigators.Count == 0 || labelled.Count == 0) return;
        // The same cut as training's time split: after the latest labelled report date less the holdout months.
        var cutoff = labelled.Max(h => h.Claim.ReportDate).AddMonths(-scoring.Value.HoldoutMonths);
        // A fresh, still-open copy of each stored claim, carrying its id, so the case can be opened and worked.
        var holdout = history.Where(h => h.Claim.ReportDate > cutoff)
            .Select(h => (Stored: h, Fresh: SeedClaims.ToClaim(schema, h.Values)))
            .ToList();
        var scored = CaseOpener.Score(model, holdout.Select(h => (h.Fresh, h.Stored.Values)), ct);
        var random = new Random(Seed);
        var sampler = new AuditSampler(queue, new Random(Seed + 1));
        var turn = 0;
        var cases = new List<Case>();
        foreach (var (s, h) in scored.Zip(holdout))
        {
            var selection = sampler.Decide(s.Explanation.Probability);
            if (selection is null) continue;
            var line = investigators.Where(u => u.Covers(s.Claim.Line)).ToList();
            if (line.Count == 0) continue;
            var who = line[turn++ % line.Count];
            var worker = new Actor(who.Id, who.UserName!, new HashSet<string> { Roles.Investigator });
            var opened = s.Claim.ReportDate;
            var closed = h.Stored.Claim.ClosedDate ?? opened;
            var c = CaseOpener.Open(s, model.Metadata.Version, playbook, opened, queue.Value.DueDays, Actor.System, selection);
            c.AssignTo(who, Actor.System, opened, "demo history");
            c.StartReview(worker, opened);
            var outcome = random.NextDouble() < InconclusiveShare ? VerdictOutcome.Inconclusive : h.Stored.Outcome!.Value;
            c.RecordVerdict(outcome, "Demo history: outcome from the claims system", null,
                outcome == VerdictOutcome.ConfirmedFraud ? s.Claim.ClaimedAmount : null, worker, closed);
            db.Entry(s.Claim).Property(x => x.Id).CurrentValue = h.Stored.Claim.Id;
            cases.Add(c);
        }
        db.ChangeTracker.AutoDetectChangesEnabled = false;
        foreach (var batch in cases.Chunk(500))
        {
            // The claim row exists already and keeps the history's outcome as its label, even where the
            // demo verdict was made inconclusive: only the case records that.
            db.Claims.AttachRange(batch.Select(c => c.Claim!));
            db.Cases.AddRange(batch);
            await db.SaveChangesAsync(ct);
        }
        db.ChangeTracker.AutoDetectChangesEnabled = true;
        db.AuditEvents.Add(new AuditEvent(Actor.System.UserName, "cases.history",
            $"{cases.Count} closed cases from {holdout.Count} holdout history claims", clock.GetUtcNow().UtcDateTime));
        log.LogInformation("Created {Cases} closed demo cases from {Holdout} holdout history claims", cases.Count, holdout.Count);
    }
}
