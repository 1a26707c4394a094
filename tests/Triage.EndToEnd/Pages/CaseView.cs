using System.Text.RegularExpressions;
using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

/// <summary>The case page: finding it and reading its drivers (work on the case is in CaseViewSteps.cs).</summary>
public sealed partial class CaseView(IPage page)
{
    public static async Task<CaseView> WaitAsync(IPage page)
    {
        await page.WaitForURLAsync(QueueView.CaseUrl());
        var view = new CaseView(page);
        await view.Heading.WaitForAsync();
        return view;
    }

    private ILocator Heading => page.GetByRole(AriaRole.Heading, new() { Level = 1, NameRegex = CaseTitle() });

    public int Id => int.Parse(page.Url[(page.Url.LastIndexOf('/') + 1)..]);

    public async Task<string> ClaimNumberAsync() => CaseTitle().Match(await Heading.InnerTextAsync()).Groups[1].Value;

    /// <summary>Waits for the driver section and at least one suggested check to be on screen.</summary>
    public async Task WaitForDriversAndChecksAsync()
    {
        await page.GetByRole(AriaRole.Heading, new() { NameRegex = DriverHeading() }).First.WaitForAsync();
        await page.GetByText("Suggested checks").First.WaitForAsync();
    }

    [GeneratedRegex(@"Case\s+(\S+)")]
    private static partial Regex CaseTitle();

    [GeneratedRegex("why this score", RegexOptions.IgnoreCase)]
    private static partial Regex DriverHeading();
}
