using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

/// <summary>The manager's insights page: the hit-rate-by-driver table and its whisker chart.</summary>
public sealed class InsightsView(IPage page)
{
    public ILocator DriverRows => page.GetByTestId("driver-table").Locator("tbody tr");
    public ILocator DriverChart => page.GetByTestId("driver-chart");

    public async Task OpenFromNavigationAsync()
    {
        await page.GetByTestId("nav-insights").ClickAsync();
        await page.WaitForURLAsync(url => url.EndsWith("/insights"));
        await DriverRows.First.WaitForAsync();
    }

    public async Task<IReadOnlyList<string>> DriverNamesAsync() =>
        (await DriverRows.Locator("[data-testid=group]").AllInnerTextsAsync()).Select(t => t.Trim()).ToList();
}
