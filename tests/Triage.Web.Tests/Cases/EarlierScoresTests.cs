using Bunit;
using Triage.Cases.Domain;
using Triage.Scoring.Explaining;
using Triage.Web.Components.Pages.Cases;

namespace Triage.Web.Tests.Cases;

public sealed class EarlierScoresTests : ComponentTest
{
    [Fact]
    public void A_re_scored_case_keeps_what_each_replaced_model_said_most_recent_first()
    {
        var c = CaseSamples.Case();
        var values = new Dictionary<string, string?>();
        c.Rescore(new Explanation(-1.0, -0.2, 0.45, [new Driver("police_report", "Police report", "no", 0.8, 11.0, "missing, unlike most claims")]),
            "v2", values, CaseSamples.InesActor, CaseSamples.Now.AddHours(1));
        c.Rescore(new Explanation(-1.0, -1.5, 0.18, [new Driver("police_report", "Police report", "no", -0.5, -6.0, "as usual")]),
            "v3", values, CaseSamples.InesActor, CaseSamples.Now.AddHours(2));

        var cut = Ctx.Render<EarlierScores>(p => p.Add(x => x.Drivers, c.SupersededDrivers));

        Assert.Equal(["v2", "fasttree-2027-03-01"], cut.FindAll("[data-testid=earlier-model]").Select(e => e.TextContent));
        var entries = cut.FindAll("[data-testid=earlier-score]");
        Assert.Contains("Police report", entries[0].TextContent);
        Assert.Contains("+11.0 pts", entries[0].TextContent);
        // The sample's first model raised the risk through two fields; its lowering driver is not listed.
        Assert.Contains("Cover raised before loss", entries[1].TextContent);
        Assert.Contains("Prior claims (3 years)", entries[1].TextContent);
        Assert.DoesNotContain("Police report", entries[1].TextContent);
    }
}
