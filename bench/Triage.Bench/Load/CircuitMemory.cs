using Microsoft.Playwright;

namespace Triage.Bench.Load;

internal sealed record CircuitFigures(long TotalBefore, long TotalAfter, int Circuits)
{
    public double PerCircuit => (double)(TotalAfter - TotalBefore) / Circuits;
}

/// <summary>
/// Opens the queue in many tabs of one signed-in headless Chromium (Debian's, through Playwright), each tab
/// its own Blazor circuit, and compares the app's resident memory before and after. A tab counts once its
/// grid has rows, which arrive over the circuit. Resident memory includes garbage not yet collected, so
/// the figure is an upper bound of what a circuit keeps.
/// </summary>
internal static class CircuitMemory
{
    public static async Task<CircuitFigures> MeasureAsync(AppUnderLoad app, string user, string password, int circuits)
    {
        using var playwright = await Playwright.CreateAsync();
        await using var browser = await playwright.Chromium.LaunchAsync(new()
        {
            ExecutablePath = "/usr/bin/chromium",
            Headless = true,
            Args = ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update"],
        });
        var context = await browser.NewContextAsync(new() { BaseURL = app.BaseUrl.ToString() });
        context.SetDefaultTimeout(60_000);
        var first = await context.NewPageAsync();
        await first.GotoAsync("/signin");
        await first.FillAsync("#username", user);
        await first.FillAsync("#password", password);
        await first.ClickAsync("form:has(#username) button[type=submit]");
        await WaitForRowsAsync(first);
        await Task.Delay(3_000);
        var before = app.ResidentBytes();
        for (var i = 0; i < circuits; i++)
        {
            var page = await context.NewPageAsync();
            await page.GotoAsync("/");
            await WaitForRowsAsync(page);
        }
        await Task.Delay(5_000);
        var after = app.ResidentBytes();
        await context.CloseAsync();
        return new CircuitFigures(before, after, circuits);
    }

    private static Task WaitForRowsAsync(IPage page) => page.Locator("[data-testid=claim-link]").First.WaitForAsync();
}
