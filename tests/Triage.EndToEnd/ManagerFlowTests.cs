using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>A manager reads hit rate by driver and the team's workload without being able to change it; signing out from the live menu.</summary>
public sealed class ManagerFlowTests(AppProcess app) : OneBrowserTest(app)
{
    private const string Manager = "Hollis Umbershaw";

    [Fact]
    public async Task Manager_sees_the_hit_rate_table_and_chart_and_a_read_only_team_page()
    {
        await new SignInPage(Page, App.BaseUrl).AsDemoAccountAsync(Manager);
        var insights = new InsightsView(Page);
        await insights.OpenFromNavigationAsync();

        var drivers = await insights.DriverNamesAsync();
        Assert.True(drivers.Count >= 3, $"the driver table shows {drivers.Count} rows");
        Assert.All(await insights.DriverRows.Locator("[data-testid=rate]").AllInnerTextsAsync(), r => Assert.Matches(@"^\d+%$|^—$", r.Trim()));
        // One dot with its interval whisker per driver row.
        await Assertions.Expect(insights.DriverChart.Locator("g[data-key] circle")).ToHaveCountAsync(drivers.Count);
        await Screenshots.SaveAsync(Page, "insights");
        await Page.GetByTestId("driver-table").ScrollIntoViewIfNeededAsync();
        await Screenshots.SaveAsync(Page, "insights-table");

        await Page.GetByTestId("nav-team").ClickAsync();
        await Page.GetByTestId("workload-table").WaitForAsync();
        await Assertions.Expect(Page.GetByTestId("read-only")).ToBeVisibleAsync();
        await Assertions.Expect(Page.GetByTestId("plan-make")).ToHaveCountAsync(0);
    }

    // Sign-out shares this class's app: signing one investigator out leaves the manager's session alone.
    // The live menu's form carries the antiforgery token the sign-out post insists on.
    [Fact]
    public async Task Sign_out_from_the_menu_ends_the_session()
    {
        // Ready means the circuit is up, so the button is the interactive layout's, not the prerendered one.
        await new SignInPage(Page, App.BaseUrl).AsDemoAccountAsync("Maren Quillfeather");
        var response = await Page.RunAndWaitForResponseAsync(
            () => Page.GetByRole(AriaRole.Button, new() { Name = "Sign out" }).ClickAsync(),
            r => r.Url.EndsWith("/account/signout", StringComparison.Ordinal));
        Assert.Equal(302, response.Status);
        await Page.WaitForURLAsync(u => new Uri(u).AbsolutePath == "/signin");
        await Page.GotoAsync(new Uri(App.BaseUrl, "/").ToString());
        await Page.WaitForURLAsync(u => new Uri(u).AbsolutePath == "/signin");
        Assert.Empty(CspViolations);
    }
}
