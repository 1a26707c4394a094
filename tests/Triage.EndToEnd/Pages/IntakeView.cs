using Microsoft.Playwright;

namespace Triage.EndToEnd.Pages;

/// <summary>The import page as an analyst uses it: choose a file, watch the bar, read the summary or the error table.</summary>
public sealed class IntakeView(IPage page, Uri baseUrl)
{
    public sealed record Summary(int Rows, int Stored, int Queued, int ScoredOnly, int Duplicates);

    public sealed record Error(string Row, string Column, string Value, string Problem);

    /// <summary>The progress bar's values (0–100) seen during the last uploads.</summary>
    public List<double> BarValues { get; } = [];

    public async Task GoToAsync()
    {
        await page.GotoAsync(new Uri(baseUrl, "/intake").ToString());
        // The page marks itself once its live connection is up; a file chosen before that would be lost.
        await page.Locator("[data-testid=intake-controls][data-live=on]").WaitForAsync();
    }

    /// <summary>Chooses the file and returns the stages the progress text showed, once the import has finished.</summary>
    public async Task<IReadOnlyList<string>> UploadAsync(string name, byte[] content)
    {
        var stages = new List<string>();
        // The picker adds a fresh input after each choice; the newest is the live one.
        await page.Locator("input[type=file]").Last.SetInputFilesAsync(new FilePayload { Name = name, MimeType = "text/csv", Buffer = content });
        var done = page.Locator("#intake-summary, #intake-rejected, #intake-failure").First;
        await page.Locator("[data-testid=intake-progress], #intake-summary, #intake-rejected, #intake-failure").First.WaitForAsync(new() { Timeout = 30_000 });
        while (!await done.IsVisibleAsync())
        {
            var stage = page.GetByTestId("intake-stage");
            try
            {
                var text = (await stage.InnerTextAsync(new() { Timeout = 1_000 })).Trim();
                var bar = await page.GetByTestId("intake-progress").GetAttributeAsync("aria-valuenow", new() { Timeout = 1_000 });
                if (stages.LastOrDefault() != text) stages.Add(text);
                if (bar is not null) BarValues.Add(double.Parse(bar, System.Globalization.CultureInfo.InvariantCulture));
            }
            catch (TimeoutException) { /* finished between the two looks */ }
            await Task.Delay(50);
        }
        return stages;
    }

    public async Task<Summary> SummaryAsync()
    {
        await page.Locator("#intake-summary").WaitForAsync();
        async Task<int> Count(string id) => int.Parse((await page.GetByTestId($"count-{id}").InnerTextAsync()).Trim());
        return new(await Count("rows"), await Count("stored"), await Count("queued"), await Count("scored-only"), await Count("duplicates"));
    }

    public async Task<(string Headline, IReadOnlyList<Error> Errors)> RejectionAsync()
    {
        var headline = await page.Locator("#intake-rejected").InnerTextAsync();
        var errors = new List<Error>();
        foreach (var row in await page.Locator("#intake-errors tbody tr").AllAsync())
        {
            var cells = (await row.Locator("td").AllInnerTextsAsync()).Select(c => c.Trim()).ToList();
            errors.Add(new Error(cells[0], cells[1], cells[2], cells[3]));
        }
        return (headline, errors);
    }
}
