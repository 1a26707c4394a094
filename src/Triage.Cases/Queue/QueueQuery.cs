using Triage.Cases.Domain;

namespace Triage.Cases.Queue;

public enum QueueView { Mine, Unassigned, AllOpen }

public enum QueueSort { Risk, Amount, Received, DueDate }

/// <summary>
/// One queue read. "Mine" is always the caller's own cases: the service takes the user from the actor,
/// never from the query, so nobody can ask for another person's list by id.
/// </summary>
public sealed record QueueQuery(
    QueueView View = QueueView.AllOpen,
    string? Line = null,
    QueueSort Sort = QueueSort.Risk,
    bool Descending = true,
    int Page = 0,
    int PageSize = 50,
    CaseStatus? Status = null,
    string? DriverField = null,
    DateTime? ReceivedFrom = null,
    DateTime? ReceivedTo = null,
    string? ClaimNumber = null)
{
    /// <summary>True when only the view, line and the default order are set: the precompiled hot path.</summary>
    internal bool IsPlainRiskOrder => Sort == QueueSort.Risk && Descending && Status is null && DriverField is null
        && ReceivedFrom is null && ReceivedTo is null && string.IsNullOrWhiteSpace(ClaimNumber);
}

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

public sealed record DriverField(string Field, string DisplayName);

/// <param name="MoreThanTotal">True when there are more than <see cref="QueueService.CountCap"/> matches and Total is the cap.</param>
public sealed record QueuePage(IReadOnlyList<QueueRow> Rows, int Total, bool MoreThanTotal = false);
