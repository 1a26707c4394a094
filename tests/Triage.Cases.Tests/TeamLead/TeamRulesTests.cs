using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.TeamLead;

public sealed class TeamRulesTests
{
    private static readonly Actor Lead = TeamStore.Lead;

    [Fact]
    public void Return_to_pool_needs_a_holder_a_reason_and_an_open_case()
    {
        var ines = Build.User("ines");
        var c = Build.Case();
        Assert.Contains("already in the unassigned pool", Assert.Throws<DomainRuleException>(() => c.ReturnToPool(Lead, Build.Now, "x")).Message);
        c.AssignTo(ines, Actor.System, Build.Now);
        Assert.Contains("needs a reason", Assert.Throws<DomainRuleException>(() => c.ReturnToPool(Lead, Build.Now, "")).Message);
        c.StartReview(Build.As(ines), Build.Now);
        c.RecordVerdict(VerdictOutcome.NotFraud, "checked", null, null, Build.As(ines), Build.Now);
        Assert.Contains("closed", Assert.Throws<DomainRuleException>(() => c.ReturnToPool(Lead, Build.Now, "x")).Message);
    }

    [Fact]
    public void A_returned_case_starts_afresh_and_can_be_taken_again()
    {
        var ines = Build.User("ines");
        var c = Build.Case();
        c.AssignTo(ines, Actor.System, Build.Now);
        c.StartReview(Build.As(ines), Build.Now);
        var before = c.Version;
        c.ReturnToPool(Lead, Build.Now, "leave");
        Assert.Equal((CaseStatus.New, (string?)null), (c.Status, c.AssigneeId));
        Assert.NotEqual(before, c.Version);
        c.AssignTo(ines, Actor.System, Build.Now);
        Assert.Equal([ines.Id, null, ines.Id], c.Assignments.Select(a => a.ToUserId));
    }

    [Fact]
    public void An_absent_person_gets_no_case_and_the_absence_changes_the_account_stamp()
    {
        var ines = Build.User("ines");
        var stamp = ines.ConcurrencyStamp;
        ines.MarkAbsent(Build.Now, "leave");
        Assert.NotEqual(stamp, ines.ConcurrencyStamp);
        Assert.Contains("marked absent", Assert.Throws<DomainRuleException>(() => Build.Case().AssignTo(ines, Actor.System, Build.Now)).Message);
        ines.MarkPresent();
        Build.Case().AssignTo(ines, Actor.System, Build.Now);
    }
}
