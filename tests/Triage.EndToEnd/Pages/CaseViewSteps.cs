using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

/// <summary>The investigator's work on an open case: ticking a check, recording a verdict, the report.</summary>
public sealed partial class CaseView
{
    /// <summary>Ticks the first open check with a note and waits until the page shows who did it.</summary>
    public async Task TickFirstCheckAsync(string note)
    {
        // The page is prerendered: a click before the live connection is up does nothing, so retry.
        var done = page.GetByText($": {note}").First;
        for (var attempt = 1; ; attempt++)
        {
            await page.Locator(".check-note").First.FillAsync(note);
            await page.Locator(".check-done-button").First.ClickAsync();
            try
            {
                await done.WaitForAsync(new() { Timeout = 4000 });
                return;
            }
            catch (TimeoutException) when (attempt < 5) { }
        }
    }

    /// <summary>Records a verdict through the form and waits for the case to show as closed.</summary>
    public async Task RecordVerdictAsync(string outcome, string note)
    {
        await page.Locator("#verdict-outcome").SelectOptionAsync(outcome);
        var reason = page.Locator("#verdict-reason");
        await Assertions.Expect(reason).ToBeEnabledAsync();
        var firstReason = await reason.Locator("option").Nth(1).GetAttributeAsync("value");
        await reason.SelectOptionAsync(firstReason!);
        await page.Locator("#verdict-note").FillAsync(note);
        await page.Locator(".verdict-submit").ClickAsync();
        await page.GetByText("Closed", new() { Exact = true }).First.WaitForAsync();
    }

    /// <summary>Fetches the case report with the browser's own sign-in cookie.</summary>
    public async Task<byte[]> DownloadReportAsync()
    {
        var href = await page.GetByText("Download case report").Locator("xpath=ancestor-or-self::a").GetAttributeAsync("href");
        var response = await page.Context.APIRequest.GetAsync(new Uri(new Uri(page.Url), href).ToString());
        Assert.True(response.Ok, $"report download answered {response.Status}");
        Assert.Equal("application/pdf", response.Headers["content-type"]);
        return await response.BodyAsync();
    }
}
