using System.Globalization;
using Bunit;
using Triage.Cases.Insights;
using Triage.Web.Components.Pages.Insights;
using Triage.Web.Tests.Cases;

namespace Triage.Web.Tests.Insights;

public sealed class RateWhiskersTests : ComponentTest
{
    private static readonly HitRateRow Enough = new("claimed_amount", "Amount claimed", 30, 10, 2); // 40 decided, 75%
    private static readonly HitRateRow Few = new("loss_hour", "Hour of loss", 1, 4, 0); // 5 decided: too few

    // The chart maps a rate r to x = 190 + r · 434 (label column 190, plot width 640 − 190 − 16).
    private static double X(double rate) => 190 + rate * 434;

    [Fact]
    public void Each_row_has_a_dot_at_its_rate_and_a_whisker_across_its_wilson_interval()
    {
        var chart = Ctx.Render<RateWhiskers>(p => p.Add(x => x.Rows, [Enough, Few]).Add(x => x.Caption, "test").Add(x => x.TestId, "driver-chart"));
        var row = chart.Find("g[data-key='claimed_amount']");
        Assert.Equal(X(0.75), Num(row.QuerySelector("circle")!.GetAttribute("cx")), 0.06);
        var whisker = row.QuerySelectorAll("line")[0];
        Assert.Equal(X(Enough.Interval.Low), Num(whisker.GetAttribute("x1")), 0.06);
        Assert.Equal(X(Enough.Interval.High), Num(whisker.GetAttribute("x2")), 0.06);
        Assert.Contains("too few to judge", chart.Find("g[data-key='loss_hour'] title").TextContent);
        Assert.Equal("white", chart.Find("g[data-key='loss_hour'] circle").GetAttribute("fill"));
        Assert.NotEqual("white", row.QuerySelector("circle")!.GetAttribute("fill"));
    }

    [Fact]
    public void The_table_flags_rows_with_too_few_decided_cases()
    {
        var table = Ctx.Render<HitRateTable>(p => p.Add(x => x.Rows, [Enough, Few]).Add(x => x.GroupTitle, "Driver"));
        var rows = table.FindAll("tbody tr");
        Assert.Equal(2, rows.Count);
        Assert.Empty(rows[0].QuerySelectorAll("[data-testid='too-few']"));
        Assert.Single(rows[1].QuerySelectorAll("[data-testid='too-few']"));
        Assert.Equal("75%", rows[0].QuerySelector("[data-testid='rate']")!.TextContent.Trim());
    }

    private static double Num(string? s) => double.Parse(s!, CultureInfo.InvariantCulture);
}
