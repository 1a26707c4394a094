using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>Signing out from the live (interactive) menu: its form carries the antiforgery token the sign-out post now insists on.</summary>
public sealed class SignOutFlowTests(AppProcess app) : IClassFixture<AppProcess>, IAsyncLifetime
{
    private readonly Browser _browser = new();
    private IPage _page = default!;

    public async Task InitializeAsync()
    {
        await _browser.InitializeAsync();
        _page = await _browser.Context.NewPageAsync();
    }

    public Task DisposeAsync() => _browser.DisposeAsync();

    [Fact]
    public async Task Sign_out_from_the_menu_ends_the_session()
    {
        // Ready means the circuit is up, so the button is the interactive layout's, not the prerendered one.
        await new SignInPage(_page, app.BaseUrl).AsDemoAccountAsync("Maren Quillfeather");
        var response = await _page.RunAndWaitForResponseAsync(
            () => _page.GetByRole(AriaRole.Button, new() { Name = "Sign out" }).ClickAsync(),
            r => r.Url.EndsWith("/account/signout", StringComparison.Ordinal));
        Assert.Equal(302, response.Status);
        await _page.WaitForURLAsync(u => new Uri(u).AbsolutePath == "/signin");
        await _page.GotoAsync(new Uri(app.BaseUrl, "/").ToString());
        await _page.WaitForURLAsync(u => new Uri(u).AbsolutePath == "/signin");
        Assert.Empty(_browser.CspViolations);
    }
}
