using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.TeamLead;

/// <summary>Unassigned open cases of one line, counted per risk band (same order as <see cref="PoolSummary.Bands"/>).</summary>
public sealed record PoolLine(string Line, int Cases, IReadOnlyList<int> ByBand);

public sealed record PoolSummary(IReadOnlyList<string> Bands, IReadOnlyList<PoolLine> Lines)
{
    public int Total => Lines.Sum(l => l.Cases);
    public int InBand(int band) => Lines.Sum(l => l.ByBand[band]);
}

public sealed record TeamWorkload(TeamDay Day, IReadOnlyList<PersonLoad> People, PoolSummary Pool);

/// <summary>An open case as the team page lists it, with the version the lead saw (a move is refused if it changed).</summary>
public sealed record TeamCaseRow(int CaseId, Guid Version, string ClaimNumber, string Line, int RiskScore, double ClaimedAmount,
    DateTime DueDate, CaseStatus Status, string? AssigneeName)
{
    public CaseSeen Seen => new(CaseId, Version);
}

public sealed record TeamCasePage(IReadOnlyList<TeamCaseRow> Rows, int Total);

/// <summary>The team page's reads: workload per investigator, the unassigned pool, and the cases a lead picks from.</summary>
public sealed class WorkloadService(TriageDbContext db, TimeProvider clock)
{
    public const int MaxPageSize = 200;
    /// <summary>Risk bands by risk score, highest first; the lower bound of each is inclusive.</summary>
    public static readonly IReadOnlyList<(string Label, int From)> Bands = [("80–100", 80), ("60–79", 60), ("40–59", 40), ("20–39", 20), ("0–19", 0)];
    internal static readonly string[] Readers = [Roles.TeamLead, Roles.Admin, Roles.Manager];

    public async Task<TeamWorkload> GetAsync(Actor actor, CancellationToken ct = default)
    {
        actor.Require("see the team's workload", Readers);
        var day = TeamDay.Of(clock.GetUtcNow().UtcDateTime);
        var people = await TeamLoad.LoadAsync(db, day, ct);
        // One grouped read in tenths of the score; bands and lines are folded from at most lines × 11 rows.
        var counts = await db.Cases.Where(c => c.IsOpen && c.AssigneeId == null)
            .GroupBy(c => new { c.Line, Tenth = c.RiskScore / 10 })
            .Select(g => new { g.Key.Line, g.Key.Tenth, Count = g.Count() })
            .ToListAsync(ct);
        var lines = counts.Select(c => c.Line).Concat(people.SelectMany(p => p.User.LineList))
            .Distinct(StringComparer.OrdinalIgnoreCase).Order(StringComparer.OrdinalIgnoreCase);
        var pool = lines.Select(line =>
        {
            var byBand = new int[Bands.Count];
            foreach (var c in counts.Where(c => string.Equals(c.Line, line, StringComparison.OrdinalIgnoreCase)))
                byBand[BandOf(c.Tenth * 10)] += c.Count;
            return new PoolLine(line, byBand.Sum(), byBand);
        }).ToList();
        return new TeamWorkload(day, people, new PoolSummary(Bands.Select(b => b.Label).ToList(), pool));
    }

    /// <summary>Index into <see cref="Bands"/> for a risk score.</summary>
    public static int BandOf(int riskScore)
    {
        for (var i = 0; i < Bands.Count; i++) if (riskScore >= Bands[i].From) return i;
        return Bands.Count - 1;
    }

    /// <summary>Every open case one person holds, riskiest first.</summary>
    public async Task<IReadOnlyList<TeamCaseRow>> CasesOfAsync(Actor actor, string userId, CancellationToken ct = default)
    {
        actor.Require("see the team's cases", Readers);
        return await Rows(db.Cases.Where(c => c.IsOpen && c.AssigneeId == userId)).ToListAsync(ct);
    }

    /// <summary>A page of the unassigned pool, riskiest first, optionally for one line.</summary>
    public async Task<TeamCasePage> PoolAsync(Actor actor, string? line, int page, int pageSize, CancellationToken ct = default)
    {
        actor.Require("see the team's cases", Readers);
        if (page < 0) throw new ArgumentOutOfRangeException(nameof(page), $"Page must be 0 or more (got {page}).");
        if (pageSize is < 1 or > MaxPageSize)
            throw new ArgumentOutOfRangeException(nameof(pageSize), $"Page size must be between 1 and {MaxPageSize} (got {pageSize}).");
        var pool = db.Cases.Where(c => c.IsOpen && c.AssigneeId == null);
        if (line is not null) pool = pool.Where(c => c.Line == line);
        var total = await pool.CountAsync(ct);
        return new TeamCasePage(await Rows(pool).Skip(page * pageSize).Take(pageSize).ToListAsync(ct), total);
    }

    private static IQueryable<TeamCaseRow> Rows(IQueryable<Case> cases) => cases.AsNoTracking()
        .OrderByDescending(c => c.Probability).ThenByDescending(c => c.Id)
        .Select(c => new TeamCaseRow(c.Id, c.Version, c.ClaimNumber, c.Line, c.RiskScore, c.ClaimedAmount, c.DueDate, c.Status, c.AssigneeName));
}
