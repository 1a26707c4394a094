using Bunit;
using Triage.Cases.CaseFile;
using Triage.Cases.Domain;
using Triage.Web.Components.Pages.Cases;

namespace Triage.Web.Tests.Cases;

public sealed class CheckListTests : ComponentTest
{
    [Fact]
    public void Checks_sit_under_their_driver_a_driver_without_playbook_says_so_and_done_checks_show_who_and_when()
    {
        var c = CaseSamples.Case();
        c.AssignTo(CaseSamples.Ines, Actor.System, CaseSamples.Now);
        c.StartReview(CaseSamples.InesActor, CaseSamples.Now);
        c.CompleteCheck(c.Checks[0].Id, CaseSamples.InesActor, CaseSamples.Now, "Broker confirms the change");
        var view = CaseSamples.View(c);

        var cut = Ctx.Render<CheckList>(p => p.Add(x => x.Raising, view.Raising).Add(x => x.CanWork, false));

        var groups = cut.FindAll("section.check-group");
        Assert.Equal("cover_raised_days_before_loss", groups[0].GetAttribute("data-field"));
        Assert.Contains("Ask why cover was raised", groups[0].TextContent);
        Assert.Contains("Done by ines.varga on 15 Mar 2027 09:30 UTC: Broker confirms the change", groups[0].TextContent);
        Assert.Contains("No playbook entry for this driver", groups[1].TextContent);
        Assert.Empty(cut.FindAll("button"));
    }

    [Fact]
    public void The_assignee_ticks_an_open_check_with_a_short_note()
    {
        var view = CaseSamples.View(CaseSamples.Case());
        CheckTick? ticked = null;
        var cut = Ctx.Render<CheckList>(p => p.Add(x => x.Raising, view.Raising).Add(x => x.CanWork, true)
            .Add(x => x.OnTick, (CheckTick t) => ticked = t));

        cut.Find("input.check-note").Change("Policy change requested by phone");
        cut.Find("button.check-done-button").Click();

        Assert.Equal(new CheckTick(view.Raising[0].Checks[0].Id, "Policy change requested by phone"), ticked);
    }
}
