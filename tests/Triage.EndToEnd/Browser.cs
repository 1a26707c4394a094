using Microsoft.Playwright;

namespace Triage.EndToEnd;

/// <summary>Debian's Chromium through Playwright's bundled driver (no `playwright install`), one profile per test run.</summary>
public sealed class Browser : IAsyncLifetime
{
    private readonly string _profile = Path.Combine(Path.GetTempPath(), "triage-e2e-profile", Guid.NewGuid().ToString("N"));
    private IPlaywright? _playwright;

    public IBrowserContext Context { get; private set; } = default!;

    public async Task InitializeAsync()
    {
        _playwright = await Playwright.CreateAsync();
        Context = await _playwright.Chromium.LaunchPersistentContextAsync(_profile, new()
        {
            ExecutablePath = "/usr/bin/chromium",
            Headless = true,
            ViewportSize = new() { Width = 1600, Height = 900 },
            // Without the networking flags Chromium keeps trying hosts it cannot reach.
            Args = ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
                "--disable-component-update", "--disable-sync"],
        });
        Context.SetDefaultTimeout(20_000);
    }

    public async Task DisposeAsync()
    {
        await Context.DisposeAsync();
        _playwright?.Dispose();
        try { Directory.Delete(_profile, recursive: true); } catch (IOException) { /* Chromium still closing */ }
    }
}
