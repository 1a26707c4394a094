using Microsoft.Playwright;

namespace Triage.EndToEnd;

/// <summary>
/// A browser test class: the app is started once for the class (its own data folder, first start on the demo),
/// and every test gets a fresh browser profile with one page.
/// </summary>
public abstract class OneBrowserTest(AppProcess app) : IClassFixture<AppProcess>, IAsyncLifetime
{
    private readonly Browser _browser = new();

    protected AppProcess App => app;
    protected IPage Page { get; private set; } = default!;
    protected IReadOnlyList<string> CspViolations => _browser.CspViolations;

    public async Task InitializeAsync()
    {
        await _browser.InitializeAsync();
        Page = await _browser.Context.NewPageAsync();
    }

    public Task DisposeAsync() => _browser.DisposeAsync();
}
