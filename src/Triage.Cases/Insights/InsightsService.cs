using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.Insights;

/// <summary>
/// What a manager reads: hit rate by driver, investigator and month, calibration and queue age. Only the
/// current verdict of a closed case counts (an amended one counts as its latest outcome). Every query
/// groups in the database and brings back one row per group. Managers and admins may read.
/// </summary>
public sealed class InsightsService(TriageDbContext db, TimeProvider clock)
{
    private static readonly string[] Readers = [Roles.Manager, Roles.Admin];
    private const int Bands = 10;

    public async Task<IReadOnlyList<HitRateRow>> ByDriverAsync(Actor actor, InsightFilter filter, CancellationToken ct)
    {
        actor.Require("read hit rates", Readers);
        // Raising drivers come first in rank order, so the top three raising ones are ranks 1–3 with a positive contribution.
        var rows = await (from x in Closed(filter)
                          join d in db.Drivers on x.CaseId equals d.CaseId
                          where d.Rank <= 3 && d.Contribution > 0
                          group x by new { d.Field, d.DisplayName } into g
                          select new
                          {
                              g.Key.Field, g.Key.DisplayName,
                              Confirmed = g.Sum(x => x.Outcome == VerdictOutcome.ConfirmedFraud ? 1 : 0),
                              NotFraud = g.Sum(x => x.Outcome == VerdictOutcome.NotFraud ? 1 : 0),
                              Inconclusive = g.Sum(x => x.Outcome == VerdictOutcome.Inconclusive ? 1 : 0),
                          }).ToListAsync(ct);
        return rows.Select(r => new HitRateRow(r.Field, r.DisplayName, r.Confirmed, r.NotFraud, r.Inconclusive))
            .OrderByDescending(r => r.Decided).ThenBy(r => r.Label, StringComparer.Ordinal).ToList();
    }

    public async Task<IReadOnlyList<HitRateRow>> ByInvestigatorAsync(Actor actor, InsightFilter filter, CancellationToken ct)
    {
        actor.Require("read hit rates", Readers);
        var rows = await Closed(filter).GroupBy(x => x.Assignee)
            .Select(g => new
            {
                g.Key,
                Confirmed = g.Sum(x => x.Outcome == VerdictOutcome.ConfirmedFraud ? 1 : 0),
                NotFraud = g.Sum(x => x.Outcome == VerdictOutcome.NotFraud ? 1 : 0),
                Inconclusive = g.Sum(x => x.Outcome == VerdictOutcome.Inconclusive ? 1 : 0),
            }).ToListAsync(ct);
        return rows.Select(r => new HitRateRow(r.Key ?? "", r.Key ?? "(nobody)", r.Confirmed, r.NotFraud, r.Inconclusive))
            .OrderBy(r => r.Label, StringComparer.Ordinal).ToList();
    }

    /// <summary>Hit rate and amount saved by the calendar month (UTC) of the verdict.</summary>
    public async Task<IReadOnlyList<MonthRow>> ByMonthAsync(Actor actor, InsightFilter filter, CancellationToken ct)
    {
        actor.Require("read hit rates", Readers);
        var rows = await Closed(filter).GroupBy(x => new { x.At.Year, x.At.Month })
            .Select(g => new
            {
                g.Key.Year, g.Key.Month,
                Confirmed = g.Sum(x => x.Outcome == VerdictOutcome.ConfirmedFraud ? 1 : 0),
                NotFraud = g.Sum(x => x.Outcome == VerdictOutcome.NotFraud ? 1 : 0),
                Inconclusive = g.Sum(x => x.Outcome == VerdictOutcome.Inconclusive ? 1 : 0),
                Saved = g.Sum(x => x.Saved ?? 0),
            }).ToListAsync(ct);
        return rows.OrderBy(r => r.Year).ThenBy(r => r.Month)
            .Select(r => new MonthRow(r.Year, r.Month, new HitRateRow($"{r.Year:D4}-{r.Month:D2}", $"{r.Year:D4}-{r.Month:D2}", r.Confirmed, r.NotFraud, r.Inconclusive), r.Saved))
            .ToList();
    }

    /// <summary>Decided cases in ten fixed probability bands (0.0–0.1 … 0.9–1.0); empty bands are left out.</summary>
    public async Task<IReadOnlyList<CalibrationRow>> CalibrationAsync(Actor actor, InsightFilter filter, CancellationToken ct)
    {
        actor.Require("read calibration", Readers);
        var rows = await Closed(filter).Where(x => x.Outcome != VerdictOutcome.Inconclusive)
            // Floor, not a cast: PostgreSQL rounds when it casts a double to an integer.
            .GroupBy(x => x.Probability >= 1 ? Bands - 1 : (int)Math.Floor(x.Probability * Bands))
            .Select(g => new
            {
                Band = g.Key,
                Decided = g.Count(),
                Confirmed = g.Sum(x => x.Outcome == VerdictOutcome.ConfirmedFraud ? 1 : 0),
                Mean = g.Average(x => x.Probability),
            }).ToListAsync(ct);
        return rows.OrderBy(r => r.Band)
            .Select(r => new CalibrationRow((double)r.Band / Bands, (double)(r.Band + 1) / Bands, r.Decided, r.Confirmed, r.Mean))
            .ToList();
    }

    /// <summary>
    /// Fraud among the claims the threshold did not queue, estimated from the closed audit-sample cases
    /// (a simple random sample of them), next to how many such claims were scored in the same period.
    /// </summary>
    public async Task<AuditSampleRow> AuditSampleAsync(Actor actor, InsightFilter filter, CancellationToken ct)
    {
        actor.Require("read the audit sample", Readers);
        var counts = await Closed(filter).Where(x => x.AuditSample)
            .GroupBy(x => 1)
            .Select(g => new
            {
                Confirmed = g.Sum(x => x.Outcome == VerdictOutcome.ConfirmedFraud ? 1 : 0),
                NotFraud = g.Sum(x => x.Outcome == VerdictOutcome.NotFraud ? 1 : 0),
                Inconclusive = g.Sum(x => x.Outcome == VerdictOutcome.Inconclusive ? 1 : 0),
            }).SingleOrDefaultAsync(ct);
        var open = db.Cases.Where(c => c.IsOpen && c.IsAuditSample);
        if (filter.Line is { } line) open = open.Where(c => c.Line == line);
        if (filter.ModelVersion is { } version) open = open.Where(c => c.ModelVersion == version);
        var notQueued = db.ClaimScores.Where(s => !s.Queued);
        if (filter.Line is { } l) notQueued = notQueued.Where(s => s.Claim!.Line == l);
        if (filter.ModelVersion is { } v) notQueued = notQueued.Where(s => s.ModelVersion == v);
        if (filter.From is { } from) notQueued = notQueued.Where(s => s.ScoredAt >= from.ToDateTime(TimeOnly.MinValue, DateTimeKind.Utc));
        if (filter.To is { } to) notQueued = notQueued.Where(s => s.ScoredAt < to.AddDays(1).ToDateTime(TimeOnly.MinValue, DateTimeKind.Utc));
        var sample = new HitRateRow("audit", "Audit sample", counts?.Confirmed ?? 0, counts?.NotFraud ?? 0, counts?.Inconclusive ?? 0);
        return new AuditSampleRow(sample, await open.CountAsync(ct), await notQueued.CountAsync(ct));
    }

    /// <summary>Open cases by age in days since opening, with how many of each are past their due date.</summary>
    public async Task<IReadOnlyList<QueueAgeRow>> QueueAgeAsync(Actor actor, string? line, CancellationToken ct)
    {
        actor.Require("read queue age", Readers);
        var today = clock.GetUtcNow().UtcDateTime.Date;
        DateTime Since(int days) => today.AddDays(-days);
        var (d2, d5, d10, d20) = (Since(2), Since(5), Since(10), Since(20));
        var open = db.Cases.Where(c => c.IsOpen);
        if (line is not null) open = open.Where(c => c.Line == line);
        var counts = await open
            .GroupBy(c => c.OpenedAt >= d2 ? 0 : c.OpenedAt >= d5 ? 1 : c.OpenedAt >= d10 ? 2 : c.OpenedAt >= d20 ? 3 : 4)
            .Select(g => new { Bucket = g.Key, Open = g.Count(), Overdue = g.Sum(c => c.DueDate < today ? 1 : 0) })
            .ToDictionaryAsync(r => r.Bucket, ct);
        string[] names = ["0–2 days", "3–5 days", "6–10 days", "11–20 days", "over 20 days"];
        return names.Select((n, i) => counts.TryGetValue(i, out var r) ? new QueueAgeRow(n, r.Open, r.Overdue) : new QueueAgeRow(n, 0, 0)).ToList();
    }

    /// <summary>The lines and model versions that closed cases carry, for the filter lists.</summary>
    public async Task<(IReadOnlyList<string> Lines, IReadOnlyList<string> ModelVersions)> FilterChoicesAsync(Actor actor, CancellationToken ct)
    {
        actor.Require("read hit rates", Readers);
        var lines = await db.Cases.Select(c => c.Line).Distinct().OrderBy(l => l).ToListAsync(ct);
        var versions = await db.Cases.Select(c => c.ModelVersion).Distinct().OrderBy(v => v).ToListAsync(ct);
        return (lines, versions);
    }

    private IQueryable<ClosedCase> Closed(InsightFilter f)
    {
        var cases = db.Cases.Where(c => c.Status == CaseStatus.Closed);
        if (f.Line is { } line) cases = cases.Where(c => c.Line == line);
        if (f.ModelVersion is { } version) cases = cases.Where(c => c.ModelVersion == version);
        var verdicts = db.Verdicts.CurrentOnDays(f.From, f.To);
        return cases.Join(verdicts, c => c.Id, v => v.CaseId, (c, v) => new ClosedCase
        {
            CaseId = c.Id, Outcome = v.Outcome, At = v.At, Saved = v.AmountSaved, Assignee = c.AssigneeName, Probability = c.Probability,
            AuditSample = c.IsAuditSample,
        });
    }

    // A class with init members (not a positional record) so EF can keep composing queries on it.
    private sealed class ClosedCase
    {
        public int CaseId { get; init; }
        public VerdictOutcome Outcome { get; init; }
        public DateTime At { get; init; }
        public double? Saved { get; init; }
        public string? Assignee { get; init; }
        public double Probability { get; init; }
        public bool AuditSample { get; init; }
    }
}
