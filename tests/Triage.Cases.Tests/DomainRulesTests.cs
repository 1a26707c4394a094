using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests;

public sealed class DomainRulesTests
{
    private static readonly DateTime Now = Build.Now;
    private readonly TriageUser _ines = Build.User("ines");
    private readonly TriageUser _tomas = Build.User("tomas", "travel,motor");

    [Fact]
    public void A_new_case_copies_what_the_queue_shows_and_starts_new()
    {
        var c = Build.Case(probability: 0.637);
        Assert.Equal(CaseStatus.New, c.Status);
        Assert.True(c.IsOpen);
        Assert.Equal(64, c.RiskScore);
        Assert.Equal("Amount claimed", c.TopDriver1);
        Assert.Equal("Prior claims (3 years)", c.TopDriver2);
        Assert.Equal([1, 2, 3], c.Drivers.Select(d => d.Rank));
        Assert.Equal(Now.AddDays(-2).Date.AddDays(10), c.DueDate);
        Assert.Equal("case.opened", Assert.Single(c.Audit).What);
    }

    [Fact]
    public void The_status_moves_new_assigned_in_review_closed()
    {
        var c = Build.Case();
        c.AssignTo(_ines, Actor.System, Now);
        Assert.Equal(CaseStatus.Assigned, c.Status);
        c.StartReview(Build.As(_ines), Now);
        Assert.Equal(CaseStatus.InReview, c.Status);
        c.RecordVerdict(VerdictOutcome.ConfirmedFraud, "Invoices forged", null, 1500, Build.As(_ines), Now);
        Assert.Equal(CaseStatus.Closed, c.Status);
        Assert.False(c.IsOpen);
        Assert.Equal(VerdictOutcome.ConfirmedFraud, c.Claim!.Outcome);
        Assert.Equal(ClaimState.Closed, c.Claim.State);
        Assert.Equal(["case.opened", "case.assigned", "case.review-started", "verdict.recorded"], c.Audit.Select(a => a.What));
    }

    [Fact]
    public void Steps_out_of_order_are_refused_with_a_reason()
    {
        var c = Build.Case();
        var e = Assert.Throws<DomainRuleException>(() => c.StartReview(Build.As(_ines), Now));
        Assert.Contains("only an assigned case can go into review", e.Message);
        e = Assert.Throws<DomainRuleException>(() => c.RecordVerdict(VerdictOutcome.NotFraud, "fine", null, null, Build.As(_ines), Now));
        Assert.Contains("only be recorded on a case in review", e.Message);
        c.AssignTo(_ines, Actor.System, Now);
        e = Assert.Throws<DomainRuleException>(() => c.StartReview(Build.As(_tomas), Now));
        Assert.Contains("Only the assignee", e.Message);
        e = Assert.Throws<DomainRuleException>(() => c.AssignTo(_ines, Actor.System, Now));
        Assert.Contains("already assigned", e.Message);
    }

    [Fact]
    public void A_case_goes_only_to_someone_who_works_its_line()
    {
        var c = Build.Case(line: "home");
        var e = Assert.Throws<DomainRuleException>(() => c.AssignTo(_tomas, Actor.System, Now));
        Assert.Contains("does not work home claims", e.Message);
    }

    [Fact]
    public void Reassigning_keeps_the_history_and_restarts_the_review()
    {
        var c = Build.Case();
        c.AssignTo(_ines, Actor.System, Now);
        c.StartReview(Build.As(_ines), Now);
        c.AssignTo(_tomas, new Actor("lead", "mara"), Now.AddHours(1), "holiday");
        Assert.Equal(CaseStatus.Assigned, c.Status);
        Assert.Equal(_tomas.Id, c.AssigneeId);
        Assert.Collection(c.Assignments,
            a => { Assert.Null(a.FromUserId); Assert.Equal(_ines.Id, a.ToUserId); },
            a => { Assert.Equal(_ines.Id, a.FromUserId); Assert.Equal(_tomas.Id, a.ToUserId); Assert.Equal("mara", a.By); });
    }

    [Fact]
    public void Verdict_rules_refuse_a_missing_reason_and_bad_amounts()
    {
        var c = InReview();
        Assert.Contains("needs a reason", Assert.Throws<DomainRuleException>(() =>
            c.RecordVerdict(VerdictOutcome.NotFraud, " ", null, null, Build.As(_ines), Now)).Message);
        Assert.Contains("only be given with a confirmed-fraud", Assert.Throws<DomainRuleException>(() =>
            c.RecordVerdict(VerdictOutcome.NotFraud, "ok", null, 10, Build.As(_ines), Now)).Message);
        Assert.Contains("between 0 and the amount claimed", Assert.Throws<DomainRuleException>(() =>
            c.RecordVerdict(VerdictOutcome.ConfirmedFraud, "forged", null, 99_999, Build.As(_ines), Now)).Message);
        Assert.Equal(CaseStatus.InReview, c.Status);
    }

    [Fact]
    public void Amending_a_verdict_adds_a_new_one_and_keeps_the_old()
    {
        var c = InReview();
        Assert.Contains("no verdict yet", Assert.Throws<DomainRuleException>(() =>
            c.AmendVerdict(VerdictOutcome.NotFraud, "x", null, null, Build.As(_ines), Now)).Message);
        c.RecordVerdict(VerdictOutcome.Inconclusive, "No reply from repairer", null, null, Build.As(_ines), Now);
        c.AmendVerdict(VerdictOutcome.ConfirmedFraud, "Repairer admitted inflated invoice", "call on 12 March", 800, Build.As(_tomas), Now.AddDays(3));
        Assert.Equal(2, c.Verdicts.Count);
        var old = c.Verdicts[0];
        Assert.False(old.IsCurrent);
        Assert.Equal(VerdictOutcome.Inconclusive, old.Outcome);
        Assert.Equal(Now.AddDays(3), old.SupersededAt);
        Assert.Equal(VerdictOutcome.ConfirmedFraud, c.CurrentVerdict!.Outcome);
        Assert.Equal(VerdictOutcome.ConfirmedFraud, c.Claim!.Outcome);
        Assert.Equal("verdict.amended", c.Audit[^1].What);
    }

    [Fact]
    public void A_closed_case_refuses_changes()
    {
        var c = InReview();
        var check = c.Checks[0];
        c.RecordVerdict(VerdictOutcome.NotFraud, "Invoices check out", null, null, Build.As(_ines), Now);
        Assert.Contains("closed", Assert.Throws<DomainRuleException>(() => c.AssignTo(_tomas, Actor.System, Now)).Message);
        Assert.Contains("closed", Assert.Throws<DomainRuleException>(() => c.CompleteCheck(check.Id, Build.As(_ines), Now, null)).Message);
    }

    [Fact]
    public void Checks_are_ticked_once_with_who_when_and_a_note()
    {
        var c = InReview();
        var check = c.Checks[0];
        c.CompleteCheck(check.Id, Build.As(_ines), Now, "Invoices match");
        Assert.Equal(("ines", Now, "Invoices match"), (check.DoneBy, check.DoneAt, check.Note));
        Assert.Throws<DomainRuleException>(() => c.CompleteCheck(check.Id, Build.As(_ines), Now, null));
        c.ReopenCheck(check.Id, Build.As(_ines), Now);
        Assert.False(check.IsDone);
    }

    [Fact]
    public void Only_one_model_serves_at_a_time()
    {
        var meta = new Triage.Scoring.Models.ModelMetadata("a", Triage.Scoring.TrainerKind.FastTree, Now, "h", 10, 5, 0.1,
            new Triage.Scoring.Models.HoldoutMetrics(0.8, 0.4, 0.1, 0.3), "olu");
        var a = ModelVersion.Register(meta, "models/a.model");
        var b = ModelVersion.Register(meta with { Version = "b" }, "models/b.model");
        a.Promote(null, Actor.System, Now, "first");
        b.Promote(a, Actor.System, Now, "better");
        Assert.False(a.IsServing);
        Assert.True(b.IsServing);
        Assert.Throws<DomainRuleException>(() => b.Promote(null, Actor.System, Now, "again"));
    }

    private Case InReview()
    {
        var c = Build.Case();
        c.AssignTo(_ines, Actor.System, Now);
        c.StartReview(Build.As(_ines), Now);
        return c;
    }
}
