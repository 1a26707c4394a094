using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>One investigator's morning in a real browser against the app started from its build output.</summary>
public sealed class InvestigatorFlowTests(AppProcess app) : OneBrowserTest(app)
{
    // A demo investigator (seed-cases/team.json) who works motor claims.
    private const string Investigator = "Maren Quillfeather";

    [Fact]
    public async Task Sign_in_move_with_keys_take_next_work_the_case_and_close_it()
    {
        var queue = await new SignInPage(Page, App.BaseUrl).AsDemoAccountAsync(Investigator);
        await queue.ShowAsync("AllOpen");
        var claims = await queue.ClaimNumbersAsync();
        Assert.True(claims.Count >= 2, $"the queue shows {claims.Count} rows");
        await Screenshots.SaveAsync(Page, "queue");

        // Keyboard only: j, j, k lands on the first row again; Enter opens it.
        await queue.PressAsync("j");
        Assert.Equal(claims[0], await queue.FocusedClaimAsync());
        await queue.PressAsync("ArrowDown");
        Assert.Equal(claims[1], await queue.FocusedClaimAsync());
        await queue.PressAsync("k");
        Assert.Equal(claims[0], await queue.FocusedClaimAsync());
        var opened = await queue.OpenFocusedWithEnterAsync();
        Assert.Equal(claims[0], await opened.ClaimNumberAsync());

        await queue.GoToAsync();
        var taken = await queue.TakeNextAsync();
        await taken.WaitForDriversAndChecksAsync();
        await Screenshots.SaveAsync(Page, "case");
        var number = await taken.ClaimNumberAsync();
        var takenId = taken.Id;

        await queue.GoToAsync();
        await queue.ShowAsync("Mine");
        await queue.SearchAsync(number);
        Assert.Equal([number], await queue.ClaimNumbersAsync());

        // Work the taken case: tick a check, download the report, record a verdict.
        await Page.GotoAsync(new Uri(App.BaseUrl, $"cases/{takenId}").ToString());
        var work = await CaseView.WaitAsync(Page);
        await work.WaitForDriversAndChecksAsync();
        await work.TickFirstCheckAsync("Policy bought online two weeks before the loss");
        var pdf = await work.DownloadReportAsync();
        Assert.Equal("%PDF", System.Text.Encoding.ASCII.GetString(pdf, 0, 4));
        await work.RecordVerdictAsync("NotFraud", "Facts checked with the claimant and the repairer");

        // A closed case leaves the open queue.
        await queue.GoToAsync();
        await queue.ShowAsync("Mine");
        await queue.SearchAsync(number, expectedRows: 0);

        // The whole day ran under the content security policy without it blocking anything.
        Assert.Empty(CspViolations);
    }
}
