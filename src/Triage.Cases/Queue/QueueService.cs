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
        var open = Filter(db.Cases.AsNoTracking(), q);
        var total = await open.CountAsync(ct);
        var rows = await Sort(open, q).Skip(q.Page * q.PageSize).Take(q.PageSize)
            .Select(c => new QueueRow(c.Id, c.ClaimNumber, c.Line, c.ClaimedAmount, c.Probability, c.RiskScore,
                c.TopDriver1, c.TopDriver2, c.ReceivedDate, c.DueDate, c.Status,
                c.Assignee == null ? null : c.Assignee.DisplayName))
            .ToListAsync(ct);
        return new QueuePage(rows, total);
    }

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

    // Id breaks ties so paging is stable.
    private static IQueryable<Case> Sort(IQueryable<Case> cases, QueueQuery q) => (q.Sort, q.Descending) switch
    {
        (QueueSort.Amount, true) => cases.OrderByDescending(c => c.ClaimedAmount).ThenBy(c => c.Id),
        (QueueSort.Amount, false) => cases.OrderBy(c => c.ClaimedAmount).ThenBy(c => c.Id),
        (QueueSort.Received, true) => cases.OrderByDescending(c => c.ReceivedDate).ThenBy(c => c.Id),
        (QueueSort.Received, false) => cases.OrderBy(c => c.ReceivedDate).ThenBy(c => c.Id),
        (_, false) => cases.OrderBy(c => c.Probability).ThenBy(c => c.Id),
        _ => cases.OrderByDescending(c => c.Probability).ThenBy(c => c.Id),
    };
}
