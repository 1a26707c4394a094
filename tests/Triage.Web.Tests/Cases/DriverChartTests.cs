using System.Globalization;
using Bunit;
using Triage.Cases.CaseWork;
using Triage.Web.Components.Layout;
using Triage.Web.Components.Pages.Cases;

namespace Triage.Web.Tests.Cases;

public sealed class DriverChartTests : ComponentTest
{
    [Fact]
    public void Bars_step_from_the_base_rate_raising_in_amber_then_lowering_in_slate_teal()
    {
        var w = DriverWaterfall.Of(CaseSamples.Case());
        var cut = Ctx.Render<DriverChart>(p => p.Add(x => x.Waterfall, w));

        var bars = cut.FindAll("g[data-field]");
        Assert.Equal(["cover_raised_days_before_loss", "prior_claims_3y", "police_report"], bars.Select(b => b.GetAttribute("data-field")));
        Assert.Equal(["bar-raises", "bar-raises", "bar-lowers"], bars.Select(b => b.ClassName));
        Assert.Equal([TriageTheme.Raising, TriageTheme.Raising, TriageTheme.Lowering], bars.Select(b => b.QuerySelector("rect")!.GetAttribute("fill")));

        // Each bar starts where the previous one ended: raising bars grow rightwards, the lowering one ends left of its start.
        double Attr(AngleSharp.Dom.IElement b, string a) => double.Parse(b.QuerySelector("rect")!.GetAttribute(a)!, CultureInfo.InvariantCulture);
        var firstEnd = Attr(bars[0], "x") + Attr(bars[0], "width");
        Assert.Equal(firstEnd, Attr(bars[1], "x"), 1);
        var secondEnd = Attr(bars[1], "x") + Attr(bars[1], "width");
        Assert.Equal(secondEnd, Attr(bars[2], "x") + Attr(bars[2], "width"), 1);

        var markers = cut.FindAll("g.chart-marker text.chart-value").Select(t => t.TextContent).ToList();
        Assert.Equal([$"{w.BasePoints:0.0}%", $"{w.ScorePoints:0.0}%"], markers);
        Assert.Contains("+", bars[0].QuerySelector("text.chart-value")!.TextContent);
        Assert.StartsWith("-", bars[2].QuerySelector("text.chart-value")!.TextContent);
    }

    [Fact]
    public void The_driver_list_says_in_words_what_raises_and_what_lowers()
    {
        var cut = Ctx.Render<DriverList>(p => p.Add(x => x.Waterfall, DriverWaterfall.Of(CaseSamples.Case())));
        var items = cut.FindAll("li");
        Assert.Equal(3, items.Count);
        Assert.Contains("Cover raised before loss", items[0].TextContent);
        Assert.Contains("Raises the risk: much sooner than typical (median 210 days)", items[0].TextContent);
        Assert.Contains("Lowers the risk: supplied, as in most honest claims", items[2].TextContent);
    }
}
