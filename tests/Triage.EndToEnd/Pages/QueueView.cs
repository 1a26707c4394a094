using System.Text.RegularExpressions;
using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

/// <summary>The queue page as a person uses it: views, search, take next and the keyboard.</summary>
public sealed partial class QueueView(IPage page, Uri baseUrl)
{
    private ILocator Grid => page.GetByTestId("queue-grid");
    public ILocator ClaimLinks => Grid.GetByTestId("claim-link");

    /// <summary>Rows load over the circuit, and the keyboard module marks the grid when it is listening.</summary>
    public async Task WaitUntilReadyAsync()
    {
        await page.Locator("[data-testid=queue-grid][data-keys=on]").WaitForAsync();
        await page.Locator("[data-testid=claim-link], [data-testid=queue-empty]").First.WaitForAsync();
    }

    public async Task GoToAsync()
    {
        await page.GotoAsync(new Uri(baseUrl, "/").ToString());
        await WaitUntilReadyAsync();
    }

    /// <summary>Switches view ("Mine", "Unassigned", "AllOpen") and waits for that view's rows.</summary>
    public async Task ShowAsync(string view)
    {
        await page.GetByTestId($"view-{view}").ClickAsync();
        await page.Locator($"[data-testid=queue-grid] tr.view-{view}, [data-testid=queue-empty]").First.WaitForAsync();
    }

    /// <summary>Searches by claim number and waits until the grid shows the expected number of rows.</summary>
    public async Task SearchAsync(string claimNumber, int expectedRows = 1)
    {
        await page.Locator("[data-testid=search] input, input[data-testid=search]").First.FillAsync(claimNumber);
        await Assertions.Expect(ClaimLinks).ToHaveCountAsync(expectedRows);
    }

    public async Task<IReadOnlyList<string>> ClaimNumbersAsync() => (await ClaimLinks.AllInnerTextsAsync()).Select(t => t.Trim()).ToList();

    /// <summary>Presses a key with the focus wherever it is (the page body at first).</summary>
    public Task PressAsync(string key) => page.Keyboard.PressAsync(key);

    /// <summary>The claim number of the row that has the keyboard focus, or null.</summary>
    public Task<string?> FocusedClaimAsync() =>
        page.EvaluateAsync<string?>("() => document.activeElement?.closest('tr')?.querySelector('a.claim-link')?.textContent?.trim() ?? null");

    public async Task<CaseView> TakeNextAsync()
    {
        await page.GetByTestId("take-next").ClickAsync();
        return await CaseView.WaitAsync(page);
    }

    public async Task<CaseView> OpenFocusedWithEnterAsync()
    {
        await page.Keyboard.PressAsync("Enter");
        return await CaseView.WaitAsync(page);
    }

    [GeneratedRegex(@"/cases/\d+$")]
    internal static partial Regex CaseUrl();
}
