using System.Globalization;
using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

/// <summary>The analyst's models page: retrain with progress, the versions list, the comparison, promote and roll back.</summary>
public sealed class ModelsView(IPage page)
{
    // A retrain on the full demo takes a while on two shared cores; the page is polled, never timed.
    private static readonly TimeSpan RetrainTimeout = TimeSpan.FromMinutes(8);

    public ILocator Versions => page.GetByTestId("model-versions");
    public ILocator Stage => page.GetByTestId("retrain-stage");
    public ILocator Progress => page.GetByTestId("retrain-progress");
    public ILocator Result => page.GetByTestId("retrain-result");
    public ILocator Comparison => page.GetByTestId("comparison");
    public ILocator Error => page.GetByTestId("model-error");

    public async Task OpenFromNavigationAsync()
    {
        await page.GetByTestId("nav-models").ClickAsync();
        await page.WaitForURLAsync(url => url.EndsWith("/models"));
        // The prerendered rows are replaced when the live page has read the versions again: wait for the live ones
        // (a click on a row's button in between lands on an element about to be removed).
        await page.Locator("[data-testid=model-versions][data-live=on] [data-testid^=status-]").First.WaitForAsync(new() { Timeout = 60_000 });
    }

    /// <summary>Waits for the live connection: the page is prerendered, and a field filled before it is up is reset.
    /// The trainer list only opens once the page is live, so open it (retrying) and keep the chosen trainer.</summary>
    public async Task WaitUntilLiveAsync(string trainer)
    {
        var item = page.Locator(".mud-popover-open .mud-list-item", new() { HasText = trainer });
        for (var attempt = 1; ; attempt++)
        {
            await page.GetByTestId("retrain-panel").Locator(".mud-select").First.ClickAsync();
            try { await item.First.WaitForAsync(new() { Timeout = 3000 }); break; }
            catch (TimeoutException) when (attempt < 8) { }
        }
        await item.First.ClickAsync();
        await Assertions.Expect(page.Locator(".mud-popover-open .mud-list-item")).ToHaveCountAsync(0);
    }

    /// <summary>Sets the number of trees (FastTree) so the retrain stays small.</summary>
    public async Task SetTreesAsync(int trees)
    {
        var input = page.Locator("[data-testid=retrain-trees] input, input[data-testid=retrain-trees]").First;
        await input.FillAsync(trees.ToString(CultureInfo.InvariantCulture));
        await input.PressAsync("Tab");
        await Assertions.Expect(input).ToHaveValueAsync(trees.ToString(CultureInfo.InvariantCulture));
    }

    /// <summary>Starts the retrain and waits until the page shows it running (stage and progress bar) or already finished.</summary>
    public async Task StartRetrainAsync()
    {
        await page.GetByTestId("retrain-start").ClickAsync();
        await page.Locator("[data-testid=retrain-stage], [data-testid=retrain-result]").First.WaitForAsync();
    }

    /// <summary>Polls the page until the retrain's result appears and the start button is back; returns the result text.</summary>
    public async Task<string> WaitForRetrainToFinishAsync()
    {
        await Result.WaitForAsync(new() { Timeout = (float)RetrainTimeout.TotalMilliseconds });
        await page.GetByTestId("retrain-start").WaitForAsync(new() { Timeout = (float)RetrainTimeout.TotalMilliseconds });
        return (await Result.InnerTextAsync()).Trim();
    }

    public ILocator Row(string version) =>
        Versions.Locator("tbody tr", new() { Has = page.Locator($"[data-testid=version-name]:text-is('{version}')") });

    public async Task<string> StatusAsync(string version) => (await page.GetByTestId($"status-{version}").InnerTextAsync()).Trim();

    public async Task<IReadOnlyList<string>> VersionNamesAsync() =>
        (await Versions.GetByTestId("version-name").AllInnerTextsAsync()).Select(t => t.Trim()).ToList();

    public async Task OpenComparisonAsync(string version)
    {
        await page.GetByTestId($"compare-{version}").ClickAsync();
        await Comparison.WaitForAsync();
    }

    /// <summary>A measure's values from the comparison table (champion, challenger), e.g. "ROC AUC".</summary>
    public async Task<(double Champion, double Challenger)> MeasureAsync(string name)
    {
        var cells = page.GetByTestId("comparison-metrics").Locator("tbody tr", new() { Has = page.Locator($"td:text-is('{name}')") }).Locator("td");
        return (Number(await cells.Nth(1).InnerTextAsync()), Number(await cells.Nth(2).InnerTextAsync()));
    }

    /// <summary>How many points the ROC curve of each model is drawn through.</summary>
    public async Task<(int Champion, int Challenger)> RocPointCountsAsync()
    {
        var chart = page.GetByTestId("roc-chart");
        async Task<int> Count(string id) =>
            ((await chart.GetByTestId(id).GetAttributeAsync("points")) ?? "").Split(' ', StringSplitOptions.RemoveEmptyEntries).Length;
        return (await Count("roc-champion"), await Count("roc-challenger"));
    }

    public Task PromoteAsync(string version, string note, bool rescore) => ServeAsync($"promote-{version}", note, rescore, version, "serving");

    public Task RollBackAsync(string version, string note, bool rescore) => ServeAsync($"rollback-{version}", note, rescore, version, "serving");

    private async Task ServeAsync(string button, string note, bool rescore, string version, string expectedStatus)
    {
        await page.GetByTestId(button).ClickAsync();
        var form = page.GetByTestId("serve-form");
        await form.WaitForAsync();
        await form.Locator("[data-testid=serve-note] textarea, [data-testid=serve-note] input, textarea[data-testid=serve-note]").First.FillAsync(note);
        if (rescore)
        {
            var box = form.Locator("[data-testid=serve-rescore] input[type=checkbox], input[type=checkbox][data-testid=serve-rescore]").First;
            await box.CheckAsync();
            await Assertions.Expect(box).ToBeCheckedAsync();
        }
        await form.GetByTestId("serve-confirm").ClickAsync();
        // The form closes when the switch is committed; re-scoring every open case happens before that.
        await Assertions.Expect(form).ToHaveCountAsync(0, new() { Timeout = 120_000 });
        await Assertions.Expect(page.GetByTestId($"status-{version}")).ToHaveTextAsync(expectedStatus);
    }

    private static double Number(string text) => double.Parse(text.Trim(), NumberStyles.Float, CultureInfo.InvariantCulture);
}
