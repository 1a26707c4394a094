using System.Text.Json;
using Triage.Scoring.Explaining;

namespace Triage.Cases.Domain;

public enum CaseStatus { New, Assigned, InReview, Closed }

/// <summary>
/// A claim the model sent for review. Status moves New → Assigned → In review → Closed only through
/// the methods below, each of which refuses a step the rules do not allow.
/// </summary>
public sealed class Case
{
    private Case() { }

    public int Id { get; private set; }
    public int ClaimId { get; private set; }
    public Claim? Claim { get; private set; }
    public CaseStatus Status { get; private set; }
    /// <summary>Status is not Closed; kept as a column so queue indexes start with an equality.</summary>
    public bool IsOpen { get; private set; }
    /// <summary>Calibrated probability of fraud as scored.</summary>
    public double Probability { get; private set; }
    /// <summary>The probability in whole points (0–100), the number investigators see.</summary>
    public int RiskScore { get; private set; }
    public double LogOdds { get; private set; }
    public double BaseLogOdds { get; private set; }
    public string ModelVersion { get; private set; } = "";
    /// <summary>The feature values exactly as the model saw them.</summary>
    public string ScoredValuesJson { get; private set; } = "{}";
    public string? AssigneeId { get; private set; }
    public TriageUser? Assignee { get; private set; }
    /// <summary>The assignee's display name when assigned, copied for the queue.</summary>
    public string? AssigneeName { get; private set; }
    public DateTime OpenedAt { get; private set; }
    public DateTime DueDate { get; private set; }
    public DateTime? ClosedAt { get; private set; }
    /// <summary>Changes on every save of a rule method, so a stale copy cannot overwrite a newer one.</summary>
    public Guid Version { get; private set; }

    // Copied from the claim and drivers so the queue reads one table.
    public string ClaimNumber { get; private set; } = "";
    public string Line { get; private set; } = "";
    public double ClaimedAmount { get; private set; }
    public DateTime ReceivedDate { get; private set; }
    /// <summary>Opened at random from below the threshold (see <see cref="CaseSelection"/>).</summary>
    public bool IsAuditSample { get; private set; }
    /// <summary>Chance this claim had of becoming a case: 1 above the threshold, the audit share below it.</summary>
    public double SelectionProbability { get; private set; } = 1.0;
    public string? TopDriver1 { get; private set; }
    public string? TopDriver2 { get; private set; }

    public List<DriverSnapshot> Drivers { get; private set; } = [];
    public List<CheckItem> Checks { get; private set; } = [];
    public List<CaseNote> Notes { get; private set; } = [];
    public List<Verdict> Verdicts { get; private set; } = [];
    public List<Assignment> Assignments { get; private set; } = [];
    public List<AuditEvent> Audit { get; private set; } = [];
    /// <summary>Driver snapshots of earlier models, replaced when the case was re-scored.</summary>
    public List<SupersededDriver> SupersededDrivers { get; private set; } = [];

    public Verdict? CurrentVerdict => Verdicts.SingleOrDefault(v => v.IsCurrent);

    public static Case Open(Claim claim, Explanation explanation, string modelVersion,
        IReadOnlyDictionary<string, string?> scoredValues, IEnumerable<CheckItem> checks,
        DateTime openedAt, int dueDays, Actor by, CaseSelection? selection = null)
    {
        selection ??= CaseSelection.ByThreshold;
        if (claim.State == ClaimState.Closed)
            throw new DomainRuleException($"Claim {claim.ClaimNumber} is closed; no case can be opened on it.");
        if (dueDays < 1) throw new DomainRuleException($"A case needs at least one day to be worked (got {dueDays}).");
        openedAt = Claim.Utc(openedAt);
        var drivers = explanation.Drivers
            .Select((d, i) => new DriverSnapshot(i + 1, d.Field, d.DisplayName, d.ValueText, d.Contribution, d.EffectPoints, d.Comparison))
            .ToList();
        var raising = drivers.Where(d => d.Raises).OrderBy(d => d.Rank).Select(d => d.DisplayName).ToList();
        var c = new Case
        {
            Claim = claim,
            Status = CaseStatus.New,
            IsOpen = true,
            Probability = explanation.Probability,
            RiskScore = (int)Math.Round(explanation.Probability * 100, MidpointRounding.AwayFromZero),
            LogOdds = explanation.LogOdds,
            BaseLogOdds = explanation.BaseValue,
            ModelVersion = modelVersion,
            ScoredValuesJson = JsonSerializer.Serialize(scoredValues),
            OpenedAt = openedAt,
            DueDate = openedAt.Date.AddDays(dueDays),
            Version = Guid.NewGuid(),
            ClaimNumber = claim.ClaimNumber,
            Line = claim.Line,
            ClaimedAmount = claim.ClaimedAmount,
            ReceivedDate = claim.ReportDate,
            IsAuditSample = selection.AuditSample,
            SelectionProbability = selection.Probability,
            TopDriver1 = raising.ElementAtOrDefault(0),
            TopDriver2 = raising.ElementAtOrDefault(1),
            Drivers = drivers,
            Checks = checks.ToList(),
        };
        c.Record(by, "case.opened", $"risk {c.RiskScore} by model {modelVersion}"
            + (selection.AuditSample ? $", drawn for the audit sample (selection probability {selection.Probability:0.####})" : ""), openedAt);
        return c;
    }

    public IReadOnlyDictionary<string, string?> ScoredValues() =>
        JsonSerializer.Deserialize<Dictionary<string, string?>>(ScoredValuesJson) ?? [];

    public void AssignTo(TriageUser assignee, Actor by, DateTime at, string? reason = null)
    {
        RefuseWhenClosed("reassigned");
        if (assignee.Id == AssigneeId) throw new DomainRuleException($"Case {ClaimNumber} is already assigned to {assignee.DisplayName}.");
        if (!assignee.Covers(Line))
            throw new DomainRuleException($"{assignee.DisplayName} does not work {Line} claims, so case {ClaimNumber} cannot go to them.");
        if (assignee.IsAbsent)
            throw new DomainRuleException($"{assignee.DisplayName} is marked absent, so case {ClaimNumber} cannot go to them; mark them present first.");
        at = Claim.Utc(at);
        Assignments.Add(new Assignment(AssigneeId, assignee.Id, by.UserName, at, reason));
        AssigneeId = assignee.Id;
        Assignee = assignee;
        AssigneeName = assignee.DisplayName;
        // A new assignee starts the review afresh.
        Status = CaseStatus.Assigned;
        Record(by, "case.assigned", $"to {assignee.UserName}" + (reason is null ? "" : $": {reason}"), at);
    }

    /// <summary>Takes the case off its assignee and puts it back in the unassigned pool, to be taken or handed out again.</summary>
    public void ReturnToPool(Actor by, DateTime at, string reason)
    {
        RefuseWhenClosed("returned to the pool");
        if (AssigneeId is null) throw new DomainRuleException($"Case {ClaimNumber} is already in the unassigned pool.");
        if (string.IsNullOrWhiteSpace(reason)) throw new DomainRuleException($"Returning case {ClaimNumber} to the pool needs a reason.");
        at = Claim.Utc(at);
        var from = AssigneeName;
        Assignments.Add(new Assignment(AssigneeId, null, by.UserName, at, reason.Trim()));
        AssigneeId = null;
        Assignee = null;
        AssigneeName = null;
        Status = CaseStatus.New;
        Record(by, "case.returned", $"from {from} to the pool: {reason.Trim()}", at);
    }

    public void StartReview(Actor by, DateTime at)
    {
        if (Status != CaseStatus.Assigned)
            throw new DomainRuleException($"Case {ClaimNumber} is {Describe(Status)}; only an assigned case can go into review.");
        RefuseUnlessAssignee(by, "start the review");
        Status = CaseStatus.InReview;
        Record(by, "case.review-started", null, at);
    }

    /// <summary>
    /// The assignee's first piece of work (a tick, a note, the verdict) moves an assigned case into review. It is
    /// part of that work, whose own audit event records it, so one action leaves one event.
    /// </summary>
    public void StartWorkBy(Actor by)
    {
        if (Status != CaseStatus.Assigned || by.UserId != AssigneeId) return;
        Status = CaseStatus.InReview;
        Version = Guid.NewGuid();
    }

    public void CompleteCheck(int checkId, Actor by, DateTime at, string? note)
    {
        RefuseWhenClosed("changed");
        var check = Checks.SingleOrDefault(c => c.Id == checkId)
            ?? throw new DomainRuleException($"Case {ClaimNumber} has no check {checkId}.");
        if (check.IsDone) throw new DomainRuleException($"Check '{check.Title}' is already done.");
        check.MarkDone(by.UserName, Claim.Utc(at), note);
        Record(by, "check.done", check.Title, at);
    }

    public void ReopenCheck(int checkId, Actor by, DateTime at)
    {
        RefuseWhenClosed("changed");
        var check = Checks.SingleOrDefault(c => c.Id == checkId && c.IsDone)
            ?? throw new DomainRuleException($"Case {ClaimNumber} has no finished check {checkId} to reopen.");
        check.Reopen();
        Record(by, "check.reopened", check.Title, at);
    }

    public void AddNote(string text, Actor by, DateTime at)
    {
        if (string.IsNullOrWhiteSpace(text)) throw new DomainRuleException("A note needs some text.");
        Notes.Add(new CaseNote(text.Trim(), by.UserName, Claim.Utc(at)));
        Record(by, "note.added", null, at);
    }

    /// <summary>Closes the case with the assignee's finding; the claim takes the outcome as its label.</summary>
    public void RecordVerdict(VerdictOutcome outcome, string reason, string? note, double? amountSaved, Actor by, DateTime at)
    {
        if (Status != CaseStatus.InReview)
            throw new DomainRuleException($"Case {ClaimNumber} is {Describe(Status)}; a verdict can only be recorded on a case in review.");
        RefuseUnlessAssignee(by, "record the verdict");
        CheckVerdict(outcome, reason, amountSaved);
        at = Claim.Utc(at);
        Verdicts.Add(new Verdict(Id, outcome, reason.Trim(), note, amountSaved, by.UserName, at, amends: null));
        Status = CaseStatus.Closed;
        IsOpen = false;
        ClosedAt = at;
        RequireClaim().Settle(outcome, at);
        Record(by, "verdict.recorded", outcome.ToString(), at);
    }

    /// <summary>Replaces the current verdict with a new one; the old one stays, marked superseded.</summary>
    public void AmendVerdict(VerdictOutcome outcome, string reason, string? note, double? amountSaved, Actor by, DateTime at)
    {
        var current = CurrentVerdict;
        if (Status != CaseStatus.Closed || current is null)
            throw new DomainRuleException($"Case {ClaimNumber} has no verdict yet; record one before amending it.");
        CheckVerdict(outcome, reason, amountSaved);
        at = Claim.Utc(at);
        current.Supersede(at);
        Verdicts.Add(new Verdict(Id, outcome, reason.Trim(), note, amountSaved, by.UserName, at, amends: current.Id));
        RequireClaim().Settle(outcome, at);
        Record(by, "verdict.amended", $"{current.Outcome} → {outcome}", at);
    }

    /// <summary>
    /// Re-scores an open case with a newly serving model: score and drivers are replaced, the old driver
    /// snapshot is kept in <see cref="SupersededDrivers"/>. Checks and work done stay as they are.
    /// </summary>
    public void Rescore(Explanation explanation, string modelVersion, IReadOnlyDictionary<string, string?> scoredValues, Actor by, DateTime at)
    {
        RefuseWhenClosed("re-scored");
        if (modelVersion == ModelVersion) throw new DomainRuleException($"Case {ClaimNumber} is already scored by model {modelVersion}.");
        at = Claim.Utc(at);
        SupersededDrivers.AddRange(Drivers.Select(d => new SupersededDriver(d, ModelVersion, at)));
        Drivers.Clear();
        Drivers.AddRange(explanation.Drivers.Select((d, i) => new DriverSnapshot(i + 1, d.Field, d.DisplayName, d.ValueText, d.Contribution, d.EffectPoints, d.Comparison)));
        var before = RiskScore;
        var previous = ModelVersion;
        Probability = explanation.Probability;
        RiskScore = (int)Math.Round(explanation.Probability * 100, MidpointRounding.AwayFromZero);
        LogOdds = explanation.LogOdds;
        BaseLogOdds = explanation.BaseValue;
        ModelVersion = modelVersion;
        ScoredValuesJson = JsonSerializer.Serialize(scoredValues);
        var raising = Drivers.Where(d => d.Raises).OrderBy(d => d.Rank).Select(d => d.DisplayName).ToList();
        TopDriver1 = raising.ElementAtOrDefault(0);
        TopDriver2 = raising.ElementAtOrDefault(1);
        Record(by, "case.rescored", $"risk {before} by model {previous} → {RiskScore} by model {modelVersion}", at);
    }

    private void CheckVerdict(VerdictOutcome outcome, string reason, double? amountSaved)
    {
        if (string.IsNullOrWhiteSpace(reason)) throw new DomainRuleException("A verdict needs a reason.");
        if (amountSaved is null) return;
        if (outcome != VerdictOutcome.ConfirmedFraud)
            throw new DomainRuleException("An amount saved can only be given with a confirmed-fraud verdict.");
        if (amountSaved < 0 || amountSaved > ClaimedAmount)
            throw new DomainRuleException($"Amount saved must be between 0 and the amount claimed ({ClaimedAmount:0.00}); got {amountSaved:0.00}.");
    }

    private void RefuseWhenClosed(string action)
    {
        if (Status == CaseStatus.Closed) throw new DomainRuleException($"Case {ClaimNumber} is closed and cannot be {action}.");
    }

    private void RefuseUnlessAssignee(Actor by, string action)
    {
        if (by.UserId != AssigneeId) throw new DomainRuleException($"Only the assignee of case {ClaimNumber} can {action}.");
    }

    private Claim RequireClaim() =>
        Claim ?? throw new InvalidOperationException($"Load the claim with case {ClaimNumber} before recording a verdict.");

    private void Record(Actor by, string what, string? detail, DateTime at)
    {
        Audit.Add(new AuditEvent(by.UserName, what, detail, at, Id == 0 ? null : Id));
        Version = Guid.NewGuid();
    }

    private static string Describe(CaseStatus s) => s switch
    {
        CaseStatus.New => "new (not yet assigned)",
        CaseStatus.Assigned => "assigned",
        CaseStatus.InReview => "in review",
        _ => "closed",
    };
}
