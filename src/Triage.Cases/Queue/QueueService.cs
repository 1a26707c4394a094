using System.Linq.Expressions;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.Queue;

/// <summary>
/// Open cases for the queue, filtered, sorted and paged in the database. Every read is authorised here:
/// an investigator sees their own and unassigned cases; team leads, managers, analysts and admins see all.
/// </summary>
public sealed class QueueService(TriageDbContext db)
{
    public const int MaxPageSize = 200;
    /// <summary>Counting stops here: a count over a filter no index covers reads every matching row.</summary>
    public const int CountCap = 10_000;
    private static readonly string[] Readers = [Roles.Investigator, Roles.TeamLead, Roles.Manager, Roles.Analyst, Roles.Admin];
    private static readonly string[] SeeEveryone = [Roles.TeamLead, Roles.Manager, Roles.Analyst, Roles.Admin];

    public static bool SeesAllCases(Actor actor) => SeeEveryone.Any(actor.IsIn);

    public async Task<QueuePage> GetPageAsync(Actor actor, QueueQuery q, CancellationToken ct = default)
    {
        actor.Require("read the queue", Readers);
        if (q.Page < 0) throw new ArgumentOutOfRangeException(nameof(q), $"Page must be 0 or more (got {q.Page}).");
        if (q.PageSize is < 1 or > MaxPageSize)
            throw new ArgumentOutOfRangeException(nameof(q), $"Page size must be between 1 and {MaxPageSize} (got {q.PageSize}).");
        if (q.ReceivedFrom > q.ReceivedTo)
            throw new ArgumentException($"Received from ({q.ReceivedFrom:yyyy-MM-dd}) is after received to ({q.ReceivedTo:yyyy-MM-dd}).", nameof(q));
        var counted = await Filter(db.Cases.AsNoTracking(), actor, q).Take(CountCap + 1).CountAsync(ct);
        return new QueuePage(await PageRowsAsync(actor, q, ct), Math.Min(counted, CountCap), counted > CountCap);
    }

    /// <summary>One page of rows, projected so only the queue's columns are read.</summary>
    internal async Task<List<QueueRow>> PageRowsAsync(Actor actor, QueueQuery q, CancellationToken ct = default)
    {
        // An investigator's "all" is their own plus the unassigned pool: not one of the precompiled shapes.
        if (!q.IsPlainRiskOrder || (q.View == QueueView.AllOpen && !SeesAllCases(actor)))
            return await Rows(Filter(db.Cases.AsNoTracking(), actor, q), q).ToListAsync(ct);
        var rows = new List<QueueRow>(q.PageSize);
        await foreach (var row in RiskOrderedQueries.For(q)(db, actor.UserId, q.Line, q.Page * q.PageSize, q.PageSize).WithCancellation(ct))
            rows.Add(row);
        return rows;
    }

    /// <summary>
    /// Fields that raise risk among the riskiest open cases, for the driver filter. Reading only the top of
    /// the queue keeps this one indexed read however large the store grows.
    /// </summary>
    public async Task<IReadOnlyList<DriverField>> DriverFieldsAsync(Actor actor, CancellationToken ct = default)
    {
        actor.Require("read the queue", Readers);
        var top = db.Cases.Where(c => c.IsOpen).OrderByDescending(c => c.Probability).Take(500).Select(c => c.Id);
        var fields = await db.Drivers.Where(d => top.Contains(d.CaseId) && d.Contribution > 0)
            .Select(d => new DriverField(d.Field, d.DisplayName)).Distinct().ToListAsync(ct);
        return fields.OrderBy(f => f.DisplayName, StringComparer.OrdinalIgnoreCase).ToList();
    }

    /// <summary>The SQL of the LINQ form of a page, for reading query plans.</summary>
    internal string PageSql(Actor actor, QueueQuery q) => Rows(Filter(db.Cases.AsNoTracking(), actor, q), q).ToQueryString();

    private static IQueryable<QueueRow> Rows(IQueryable<Case> open, QueueQuery q) =>
        Sort(open, q).Skip(q.Page * q.PageSize).Take(q.PageSize).Select(ToRow);

    // One table, no join: everything a row shows is copied onto the case.
    private static readonly Expression<Func<Case, QueueRow>> ToRow = c => new QueueRow(c.Id, c.ClaimNumber, c.Line,
        c.ClaimedAmount, c.Probability, c.RiskScore, c.TopDriver1, c.TopDriver2, c.ReceivedDate, c.DueDate, c.Status, c.AssigneeName);

    internal IQueryable<Case> Filter(IQueryable<Case> cases, Actor actor, QueueQuery q)
    {
        var me = actor.UserId;
        var open = q.View switch
        {
            QueueView.Mine => cases.Where(c => c.AssigneeId == me && c.IsOpen),
            QueueView.Unassigned => cases.Where(c => c.AssigneeId == null && c.IsOpen),
            _ when SeesAllCases(actor) => cases.Where(c => c.IsOpen),
            _ => cases.Where(c => (c.AssigneeId == me || c.AssigneeId == null) && c.IsOpen),
        };
        if (q.Line is { } line) open = open.Where(c => c.Line == line);
        if (q.Status is { } status) open = open.Where(c => c.Status == status);
        if (q.ReceivedFrom is { } from) open = open.Where(c => c.ReceivedDate >= from.Date);
        if (q.ReceivedTo is { } to) open = open.Where(c => c.ReceivedDate < to.Date.AddDays(1));
        if (!string.IsNullOrWhiteSpace(q.DriverField))
        {
            var field = q.DriverField.Trim();
            open = open.Where(c => c.Drivers.Any(d => d.Field == field && d.Contribution > 0));
        }
        if (!string.IsNullOrWhiteSpace(q.ClaimNumber))
        {
            // Claim numbers are issued upper-case. SQLite compares text bytewise, so the range below is exactly
            // the prefix and lets the claim-number index answer; PostgreSQL's collation may not, so it keeps LIKE alone.
            var number = q.ClaimNumber.Trim().ToUpperInvariant();
            open = open.Where(c => c.ClaimNumber.StartsWith(number));
            if (db.Database.IsSqlite())
            {
                var end = number + char.MaxValue;
                open = open.Where(c => string.Compare(c.ClaimNumber, number) >= 0 && string.Compare(c.ClaimNumber, end) < 0);
            }
        }
        return open;
    }

    // Id breaks ties so paging is stable; it runs the same way as the key so an index on
    // (..., Probability) — which ends in the row id — serves the whole ORDER BY without a sort.
    private static IQueryable<Case> Sort(IQueryable<Case> cases, QueueQuery q) => (q.Sort, q.Descending) switch
    {
        (QueueSort.Amount, true) => cases.OrderByDescending(c => c.ClaimedAmount).ThenByDescending(c => c.Id),
        (QueueSort.Amount, false) => cases.OrderBy(c => c.ClaimedAmount).ThenBy(c => c.Id),
        (QueueSort.Received, true) => cases.OrderByDescending(c => c.ReceivedDate).ThenByDescending(c => c.Id),
        (QueueSort.Received, false) => cases.OrderBy(c => c.ReceivedDate).ThenBy(c => c.Id),
        (QueueSort.DueDate, true) => cases.OrderByDescending(c => c.DueDate).ThenByDescending(c => c.Id),
        (QueueSort.DueDate, false) => cases.OrderBy(c => c.DueDate).ThenBy(c => c.Id),
        (_, false) => cases.OrderBy(c => c.Probability).ThenBy(c => c.Id),
        _ => cases.OrderByDescending(c => c.Probability).ThenByDescending(c => c.Id),
    };
}
