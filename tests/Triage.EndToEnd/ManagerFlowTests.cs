using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>A manager reads hit rate by driver, and the team's workload without being able to change it.</summary>
public sealed class ManagerFlowTests(AppProcess app) : IClassFixture<AppProcess>, IAsyncLifetime
{
    private const string Manager = "Hollis Umbershaw";
    private readonly Browser _browser = new();
    private IPage _page = default!;

    public async Task InitializeAsync()
    {
        await _browser.InitializeAsync();
        _page = await _browser.Context.NewPageAsync();
    }

    public Task DisposeAsync() => _browser.DisposeAsync();

    [Fact]
    public async Task Manager_sees_the_hit_rate_table_and_chart_and_a_read_only_team_page()
    {
        await new SignInPage(_page, app.BaseUrl).AsDemoAccountAsync(Manager);
        var insights = new InsightsView(_page);
        await insights.OpenFromNavigationAsync();

        var drivers = await insights.DriverNamesAsync();
        Assert.True(drivers.Count >= 3, $"the driver table shows {drivers.Count} rows");
        Assert.All(await insights.DriverRows.Locator("[data-testid=rate]").AllInnerTextsAsync(), r => Assert.Matches(@"^\d+%$|^—$", r.Trim()));
        // One dot with its interval whisker per driver row.
        await Assertions.Expect(insights.DriverChart.Locator("g[data-key] circle")).ToHaveCountAsync(drivers.Count);
        await Screenshots.SaveAsync(_page, "insights");
        await _page.GetByTestId("driver-table").ScrollIntoViewIfNeededAsync();
        await Screenshots.SaveAsync(_page, "insights-table");

        await _page.GetByTestId("nav-team").ClickAsync();
        await _page.GetByTestId("workload-table").WaitForAsync();
        await Assertions.Expect(_page.GetByTestId("read-only")).ToBeVisibleAsync();
        await Assertions.Expect(_page.GetByTestId("plan-make")).ToHaveCountAsync(0);
    }
}
