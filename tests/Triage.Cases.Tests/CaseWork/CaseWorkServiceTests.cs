using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.CaseWork;

public sealed class CaseWorkServiceTests
{
    private static readonly VerdictInput Fraud = new(VerdictOutcome.ConfirmedFraud, "Amount exaggerated", "Invoices inflated.", 1500);

    [Fact]
    public async Task Opening_a_case_writes_an_audit_event_and_does_not_assign_it()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync();
        var file = await f.OpenAsync(id, f.InesActor);
        Assert.Null(file.Case.AssigneeId);
        var c = await f.LoadAsync(id);
        Assert.Equal(CaseStatus.New, c.Status);
        Assert.Contains(c.Audit, a => a is { What: "case.file-opened", Who: "ines" } && a.At == TestStore.Today.UtcDateTime);
    }

    [Theory]
    [InlineData(Roles.TeamLead)]
    [InlineData(Roles.Manager)]
    [InlineData(Roles.Analyst)]
    [InlineData(Roles.Admin)]
    public async Task Readers_may_open_a_case_assigned_to_someone_else(string role)
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var file = await f.OpenAsync(id, CaseWorkFixture.As(f.Mara, role));
        Assert.Equal(f.Ines.Id, file.Case.AssigneeId);
    }

    [Fact]
    public async Task An_investigator_may_not_open_a_colleagues_case()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var e = await Assert.ThrowsAsync<AccessDeniedException>(() => f.OpenAsync(id, f.TomasActor));
        Assert.Contains("assigned to INES", e.Message);
        Assert.DoesNotContain((await f.LoadAsync(id)).Audit, a => a.What == "case.file-opened");
    }

    [Fact]
    public async Task The_assignees_first_tick_starts_the_review_and_records_who_when_and_the_note()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var file = await f.OpenAsync(id, f.InesActor);
        var check = file.Raising.SelectMany(d => d.Checks).Single();
        await f.WorkAsync(s => s.TickCheckAsync(id, check.Id, "  invoices match  ", file.Stamp, f.InesActor));
        var c = await f.LoadAsync(id);
        Assert.Equal(CaseStatus.InReview, c.Status);
        var done = c.Checks.Single();
        Assert.Equal(("ines", "invoices match"), (done.DoneBy, done.Note));
        Assert.Equal(TestStore.Today.UtcDateTime, done.DoneAt);
        // Starting the review is part of the tick: one action, one audit event.
        Assert.Equal(["check.done"], c.Audit.Where(a => a.What is "case.review-started" or "check.done").Select(a => a.What));
        Assert.Contains(new CaseChanged(id, "check.done"), f.Published);

        var again = await f.OpenAsync(id, f.InesActor);
        await f.WorkAsync(s => s.UntickCheckAsync(id, check.Id, again.Stamp, f.InesActor));
        Assert.False((await f.LoadAsync(id)).Checks.Single().IsDone);
    }

    [Fact]
    public async Task Only_the_assignee_ticks_checks_and_records_the_verdict()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var file = await f.OpenAsync(id, f.Lead);
        var check = file.Raising.SelectMany(d => d.Checks).Single();
        var tomas = CaseWorkFixture.As(f.Tomas, Roles.Investigator);
        var e = await Assert.ThrowsAsync<AccessDeniedException>(() => f.WorkAsync(s => s.TickCheckAsync(id, check.Id, null, file.Stamp, tomas)));
        Assert.Contains("assigned to INES; only they can work on it", e.Message);
        await Assert.ThrowsAsync<AccessDeniedException>(() => f.WorkAsync(s => s.RecordVerdictAsync(id, Fraud, file.Stamp, tomas)));
        // A team lead may read and add notes but not work the case.
        var lead = await Assert.ThrowsAsync<AccessDeniedException>(() => f.WorkAsync(s => s.TickCheckAsync(id, check.Id, null, file.Stamp, f.Lead)));
        Assert.Contains("needs the role Investigator", lead.Message);
        await Assert.ThrowsAsync<AccessDeniedException>(() => f.WorkAsync(s => s.RecordVerdictAsync(id, Fraud, file.Stamp, f.Lead)));
        Assert.Equal(CaseStatus.Assigned, (await f.LoadAsync(id)).Status);
    }

    [Theory]
    [InlineData(Roles.TeamLead, true)]
    [InlineData(Roles.Manager, true)]
    [InlineData(Roles.Analyst, false)]
    [InlineData(Roles.Admin, false)]
    public async Task Who_may_add_a_note_to_someone_elses_case(string role, bool allowed)
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var by = CaseWorkFixture.As(f.Mara, role);
        var file = await f.OpenAsync(id, by);
        var add = () => f.WorkAsync(s => s.AddNoteAsync(id, "Called the repairer.", file.Stamp, by));
        if (allowed)
        {
            await add();
            var c = await f.LoadAsync(id);
            Assert.Equal(("Called the repairer.", "mara"), (c.Notes.Single().Text, c.Notes.Single().By));
            Assert.Equal(CaseStatus.Assigned, c.Status); // someone else's note does not start the assignee's review
        }
        else
        {
            await Assert.ThrowsAsync<AccessDeniedException>(add);
        }
    }

    [Fact]
    public async Task A_verdict_closes_the_case_and_its_reason_must_fit_the_outcome()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var file = await f.OpenAsync(id, f.InesActor);
        var wrong = Fraud with { Reason = "Facts verified with documents" };
        var e = await Assert.ThrowsAsync<DomainRuleException>(() => f.WorkAsync(s => s.RecordVerdictAsync(id, wrong, file.Stamp, f.InesActor)));
        Assert.Contains("not a reason for Confirmed fraud", e.Message);

        await f.WorkAsync(s => s.RecordVerdictAsync(id, Fraud, file.Stamp, f.InesActor));
        var c = await f.LoadAsync(id);
        Assert.Equal(CaseStatus.Closed, c.Status);
        Assert.Equal((VerdictOutcome.ConfirmedFraud, "Amount exaggerated", 1500.0), (c.CurrentVerdict!.Outcome, c.CurrentVerdict.Reason, c.CurrentVerdict.AmountSaved));
        Assert.Equal(VerdictOutcome.ConfirmedFraud, c.Claim!.Outcome);
        Assert.Contains(c.Audit, a => a.What == "verdict.recorded");
        Assert.Contains(new CaseChanged(id, "verdict.recorded"), f.Published);
    }

    [Fact]
    public async Task An_amendment_needs_a_reason_and_keeps_the_history()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var file = await f.OpenAsync(id, f.InesActor);
        await f.WorkAsync(s => s.RecordVerdictAsync(id, Fraud, file.Stamp, f.InesActor));
        var closed = await f.OpenAsync(id, f.InesActor);
        var amend = new VerdictInput(VerdictOutcome.NotFraud, "Facts verified with documents", null, null);
        var e = await Assert.ThrowsAsync<DomainRuleException>(() => f.WorkAsync(s => s.AmendVerdictAsync(id, amend, closed.Stamp, f.InesActor)));
        Assert.Contains("amendment needs a reason", e.Message);
        var manager = CaseWorkFixture.As(f.Mara, Roles.Manager);
        await Assert.ThrowsAsync<AccessDeniedException>(() =>
            f.WorkAsync(s => s.AmendVerdictAsync(id, amend with { Note = "Receipts arrived." }, closed.Stamp, manager)));

        await f.WorkAsync(s => s.AmendVerdictAsync(id, amend with { Note = "Receipts arrived." }, closed.Stamp, f.Lead));
        var c = await f.LoadAsync(id);
        Assert.Equal(2, c.Verdicts.Count);
        var old = c.Verdicts.Single(v => !v.IsCurrent);
        Assert.Equal(VerdictOutcome.ConfirmedFraud, old.Outcome);
        Assert.Equal((VerdictOutcome.NotFraud, "Receipts arrived.", old.Id), (c.CurrentVerdict!.Outcome, c.CurrentVerdict.Note, c.CurrentVerdict.AmendsVerdictId));
        Assert.Equal(VerdictOutcome.NotFraud, c.Claim!.Outcome);
        Assert.Contains(c.Audit, a => a is { What: "verdict.amended", Who: "mara" });
    }
}
