using System.Linq.Expressions;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.Queue;

public enum QueueView { Mine, Unassigned, AllOpen }

public enum QueueSort { Risk, Amount, Received }

public sealed record QueueQuery(
    QueueView View = QueueView.AllOpen,
    string? UserId = null,
    string? Line = null,
    QueueSort Sort = QueueSort.Risk,
    bool Descending = true,
    int Page = 0,
    int PageSize = 50);

public enum DueState { OnTime, DueSoon, Overdue }

public sealed record QueueRow(
    int CaseId,
    string ClaimNumber,
    string Line,
    double ClaimedAmount,
    double Probability,
    int RiskScore,
    string? TopDriver1,
    string? TopDriver2,
    DateTime ReceivedDate,
    DateTime DueDate,
    CaseStatus Status,
    string? AssigneeName)
{
    public int AgeDays(DateTime today) => Math.Max(0, (today.Date - ReceivedDate.Date).Days);

    /// <summary>Due within two days counts as due soon (a common-practice warning margin, not a rule).</summary>
    public DueState Due(DateTime today) =>
        DueDate.Date < today.Date ? DueState.Overdue : DueDate.Date <= today.Date.AddDays(2) ? DueState.DueSoon : DueState.OnTime;
}

public sealed record QueuePage(IReadOnlyList<QueueRow> Rows, int Total);

/// <summary>Open cases for the investigator queue, filtered, sorted and paged in the database.</summary>
public sealed class QueueService(TriageDbContext db)
{
    public const int MaxPageSize = 200;

    public async Task<QueuePage> GetPageAsync(QueueQuery q, CancellationToken ct = default)
    {
        if (q.Page < 0) throw new ArgumentOutOfRangeException(nameof(q), $"Page must be 0 or more (got {q.Page}).");
        if (q.PageSize is < 1 or > MaxPageSize)
            throw new ArgumentOutOfRangeException(nameof(q), $"Page size must be between 1 and {MaxPageSize} (got {q.PageSize}).");
        var total = await Filter(db.Cases.AsNoTracking(), q).CountAsync(ct);
        return new QueuePage(await PageRowsAsync(q, ct), total);
    }

    /// <summary>One page of rows, projected so only the queue's columns are read.</summary>
    internal async Task<List<QueueRow>> PageRowsAsync(QueueQuery q, CancellationToken ct = default)
    {
        if (q is not { Sort: QueueSort.Risk, Descending: true })
            return await Rows(Filter(db.Cases.AsNoTracking(), q), q).ToListAsync(ct);
        var rows = new List<QueueRow>(q.PageSize);
        await foreach (var row in RiskOrderedQueries.For(q)(db, q.UserId, q.Line, q.Page * q.PageSize, q.PageSize).WithCancellation(ct))
            rows.Add(row);
        return rows;
    }

    /// <summary>The SQL of the LINQ form of a page, for reading query plans.</summary>
    internal string PageSql(QueueQuery q) => Rows(Filter(db.Cases.AsNoTracking(), q), q).ToQueryString();

    private static IQueryable<QueueRow> Rows(IQueryable<Case> open, QueueQuery q) =>
        Sort(open, q).Skip(q.Page * q.PageSize).Take(q.PageSize).Select(ToRow);

    // One table, no join: everything a row shows is copied onto the case.
    private static readonly Expression<Func<Case, QueueRow>> ToRow = c => new QueueRow(c.Id, c.ClaimNumber, c.Line,
        c.ClaimedAmount, c.Probability, c.RiskScore, c.TopDriver1, c.TopDriver2, c.ReceivedDate, c.DueDate, c.Status, c.AssigneeName);

    internal static IQueryable<Case> Filter(IQueryable<Case> cases, QueueQuery q)
    {
        if (q.View == QueueView.Mine && q.UserId is null) throw new ArgumentException("'My cases' needs the user id.", nameof(q));
        var open = q.View switch
        {
            QueueView.Mine => cases.Where(c => c.AssigneeId == q.UserId && c.IsOpen),
            QueueView.Unassigned => cases.Where(c => c.AssigneeId == null && c.IsOpen),
            _ => cases.Where(c => c.IsOpen),
        };
        return q.Line is null ? open : open.Where(c => c.Line == q.Line);
    }

    // Id breaks ties so paging is stable; it runs the same way as the key so an index on
    // (..., Probability) — which ends in the row id — serves the whole ORDER BY without a sort.
    private static IQueryable<Case> Sort(IQueryable<Case> cases, QueueQuery q) => (q.Sort, q.Descending) switch
    {
        (QueueSort.Amount, true) => cases.OrderByDescending(c => c.ClaimedAmount).ThenByDescending(c => c.Id),
        (QueueSort.Amount, false) => cases.OrderBy(c => c.ClaimedAmount).ThenBy(c => c.Id),
        (QueueSort.Received, true) => cases.OrderByDescending(c => c.ReceivedDate).ThenByDescending(c => c.Id),
        (QueueSort.Received, false) => cases.OrderBy(c => c.ReceivedDate).ThenBy(c => c.Id),
        (_, false) => cases.OrderBy(c => c.Probability).ThenBy(c => c.Id),
        _ => cases.OrderByDescending(c => c.Probability).ThenByDescending(c => c.Id),
    };
}
