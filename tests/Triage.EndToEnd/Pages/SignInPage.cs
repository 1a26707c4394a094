using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

public sealed class SignInPage(IPage page, Uri baseUrl)
{
    /// <summary>Signs in with the demo account button for that person and waits for the queue.</summary>
    public async Task<QueueView> AsDemoAccountAsync(string displayName)
    {
        await page.GotoAsync(new Uri(baseUrl, "/signin").ToString());
        await page.Locator("button.demo-account", new() { HasText = displayName }).ClickAsync();
        await page.WaitForURLAsync(new Uri(baseUrl, "/").ToString());
        var queue = new QueueView(page, baseUrl);
        await queue.WaitUntilReadyAsync();
        return queue;
    }
}
