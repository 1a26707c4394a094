using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

/// <summary>The team page as a lead uses it: a person's cases, ticking, moving, absence, auto-balance.</summary>
public sealed class TeamView(IPage page, Uri baseUrl)
{
    public ILocator Message => page.GetByTestId("team-message");
    private ILocator Picker => page.GetByTestId("case-picker");

    public async Task GoToAsync()
    {
        await page.GotoAsync(new Uri(baseUrl, "/team").ToString());
        await page.GetByTestId("workload-table").WaitForAsync();
    }

    public ILocator Person(string userName) => page.GetByTestId($"person-{userName}");

    /// <summary>Lists a person's open cases; retried because the page is prerendered and a click before the live connection does nothing.</summary>
    public async Task ShowCasesOfAsync(string userName, string displayName)
    {
        var title = page.GetByTestId("cases-title").Filter(new() { HasText = $"Open cases of {displayName}" });
        for (var attempt = 1; ; attempt++)
        {
            await Person(userName).GetByTestId("show-cases").ClickAsync();
            try { await title.WaitForAsync(new() { Timeout = 3000 }); break; }
            catch (TimeoutException) when (attempt < 6) { }
        }
        await page.Locator("[data-testid=case-picker] tbody tr, [data-testid=picker-empty]").First.WaitForAsync();
    }

    public async Task<IReadOnlyList<string>> ListedClaimsAsync() =>
        (await Picker.Locator("tbody tr td:nth-child(2)").AllInnerTextsAsync()).Select(t => t.Trim()).ToList();

    public Task TickAsync(string claimNumber) => Picker.GetByTestId($"case-{claimNumber}").GetByTestId("pick").CheckAsync();

    /// <summary>Moves the ticked cases to a person (by display name) or, with null, back to the pool.</summary>
    public async Task MoveAsync(string? toDisplayName, string reason)
    {
        await FillMoveAsync(toDisplayName, reason);
        await SubmitMoveAsync();
    }

    public async Task FillMoveAsync(string? toDisplayName, string reason)
    {
        var target = page.GetByTestId("move-target");
        if (toDisplayName is null) await target.SelectOptionAsync("pool");
        else
        {
            var value = await target.Locator("option", new() { HasText = toDisplayName }).GetAttributeAsync("value");
            await target.SelectOptionAsync(value!);
        }
        await page.GetByTestId("move-reason").FillAsync(reason);
    }

    public async Task SubmitMoveAsync()
    {
        await page.GetByTestId("move-apply").ClickAsync();
        await Message.WaitForAsync();
    }

    public async Task MarkAbsentAsync(string note)
    {
        await page.Locator("#absence-note").FillAsync(note);
        await page.GetByTestId("mark-absent").ClickAsync();
        await page.GetByTestId("mark-present").WaitForAsync();
    }

    public async Task ReturnAllAsync()
    {
        await page.GetByTestId("return-all").ClickAsync();
        await Assertions.Expect(Message).ToContainTextAsync("to the pool");
    }

    public async Task<ILocator> PlanAsync()
    {
        await page.GetByTestId("plan-make").ClickAsync();
        var plan = page.GetByTestId("plan");
        await plan.WaitForAsync();
        return plan;
    }

    public async Task ApplyPlanAsync()
    {
        await page.GetByTestId("plan-apply").ClickAsync();
        await Assertions.Expect(Message).ToContainTextAsync("Auto-balance applied");
    }
}
