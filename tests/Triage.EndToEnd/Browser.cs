using Microsoft.Playwright;

namespace Triage.EndToEnd;

/// <summary>Debian's Chromium through Playwright's bundled driver (no `playwright install`), one profile per test run.</summary>
public sealed class Browser : IAsyncLifetime
{
    private readonly string _profile = Path.Combine(Path.GetTempPath(), "triage-e2e-profile", Guid.NewGuid().ToString("N"));
    private IPlaywright? _playwright;

    private readonly List<string> _cspViolations = [];

    public IBrowserContext Context { get; private set; } = default!;

    /// <summary>Console reports of anything the content security policy blocked, on every page of the context.</summary>
    public IReadOnlyList<string> CspViolations { get { lock (_cspViolations) return [.. _cspViolations]; } }

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
        foreach (var page in Context.Pages) Watch(page);
        Context.Page += (_, page) => Watch(page);
    }

    private void Watch(IPage page) => page.Console += (_, message) =>
    {
        if (!message.Text.Contains("Content Security Policy", StringComparison.OrdinalIgnoreCase)) return;
        lock (_cspViolations) _cspViolations.Add($"{page.Url}: {message.Text}");
    };

    public async Task DisposeAsync()
    {
        await Context.DisposeAsync();
        _playwright?.Dispose();
        try { Directory.Delete(_profile, recursive: true); } catch (IOException) { /* Chromium still closing */ }
    }
}
