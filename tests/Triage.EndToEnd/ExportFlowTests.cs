using System.Globalization;
using CsvHelper;
using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>An analyst exports confirmed outcomes for one line and reads the drift page, in a real browser against the embedded default.</summary>
public sealed class ExportFlowTests(AppProcess app) : OneBrowserTest(app)
{
    // The demo analyst (seed-cases/team.json).
    private const string Analyst = "Anouk Yarrowtor";

    [Fact]
    public async Task Analyst_exports_motor_outcomes_as_csv_and_reads_the_drift_page()
    {
        await new SignInPage(Page, App.BaseUrl).AsDemoAccountAsync(Analyst);
        await Page.GetByTestId("nav-export").ClickAsync();
        await Page.WaitForURLAsync(new Uri(App.BaseUrl, "/export").ToString());
        var download = Page.GetByTestId("export-download");
        var all = await CountAsync();
        Assert.True(all > 0, "the demo history closed some cases");

        // The page is prerendered: a click before the live connection is up does nothing, so retry until the list opens.
        var motor = Page.Locator(".mud-popover-open .mud-list-item", new() { HasText = "motor" });
        for (var attempt = 1; ; attempt++)
        {
            await Page.Locator(".mud-select", new() { Has = Page.GetByText("Line of business") }).First.ClickAsync();
            try { await motor.First.WaitForAsync(new() { Timeout = 3000 }); break; }
            catch (TimeoutException) when (attempt < 6) { }
        }
        await motor.First.ClickAsync();
        await Assertions.Expect(download).ToHaveAttributeAsync("href", new System.Text.RegularExpressions.Regex("line=motor"));
        await Assertions.Expect(Page.GetByTestId("export-summary")).ToContainTextAsync("line motor");
        var count = await CountAsync();
        Assert.InRange(count, 1, all - 1);
        await Screenshots.SaveAsync(Page, "export");

        var file = await Page.RunAndWaitForDownloadAsync(() => download.ClickAsync());
        Assert.EndsWith(".csv", file.SuggestedFilename);
        var path = await file.PathAsync();
        using var csv = CsvReader.FromFile(path);
        var header = csv.Headers.ToList();
        Assert.Equal(["claim_number", "line_of_business", "case_opened_at", "verdict_at", "outcome", "label", "score", "model_version",
            "audit_sample", "selection_probability"], header.Take(10));
        Assert.Contains("claimed_amount", header);
        var rows = 0;
        while (csv.Read())
        {
            rows++;
            Assert.Equal("motor", csv.GetString("line_of_business"));
            Assert.Contains(csv.GetString("label"), new[] { "0", "1" });
            Assert.StartsWith("LM-", csv.GetString("claim_number"));
            Assert.InRange(double.Parse(csv.GetString("score")!, CultureInfo.InvariantCulture), 0, 1);
        }
        Assert.Equal(count, rows);

        // Drift: the open claims of the last days against the first model's training data, with real figures.
        await Page.GetByTestId("nav-drift").ClickAsync();
        await Page.WaitForURLAsync(new Uri(App.BaseUrl, "/models/drift").ToString());
        await Assertions.Expect(Page.GetByTestId("drift-summary")).ToContainTextAsync("claims scored on arrival");
        var table = Page.GetByTestId("drift-table");
        Assert.True(await table.Locator("tbody tr").CountAsync() > 5);
        Assert.Equal(await table.Locator("tbody tr").CountAsync(), await Page.Locator("[data-testid=psi-chart] g.psi-row").CountAsync());
        await Screenshots.SaveAsync(Page, "drift");
    }

    private async Task<int> CountAsync()
    {
        var text = await Page.GetByTestId("export-count").InnerTextAsync();
        return int.Parse(text, NumberStyles.AllowThousands, CultureInfo.InvariantCulture);
    }
}
