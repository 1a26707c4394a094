using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>An analyst's claims upload in a real browser: a good file, a bad one, the same good one again.</summary>
public sealed class IntakeFlowTests(AppProcess app) : OneBrowserTest(app)
{
    // The demo analyst (seed-cases/team.json).
    private const string Analyst = "Anouk Yarrowtor";
    private const int Claims = 1_500;

    [Fact]
    public async Task Upload_new_claims_see_progress_and_summary_then_errors_then_duplicates_and_the_queue()
    {
        var prefix = $"E2E{Guid.NewGuid().ToString("N")[..6].ToUpperInvariant()}-";
        var good = NewClaimsCsv(prefix, Claims);
        var queue = await new SignInPage(Page, App.BaseUrl).AsDemoAccountAsync(Analyst);
        var intake = new IntakeView(Page, App.BaseUrl);
        await intake.GoToAsync();

        var stages = await intake.UploadAsync("todays-claims.csv", System.Text.Encoding.UTF8.GetBytes(good));
        var first = await intake.SummaryAsync();
        Assert.Equal((Claims, Claims, 0), (first.Rows, first.Stored, first.Duplicates));
        Assert.True(first.Queued > 0, "no claim of the file was queued");
        Assert.Equal(Claims, first.Queued + first.ScoredOnly);
        Assert.Contains(stages, s => s.StartsWith("Checking every row") || s.StartsWith("Scoring and storing"));
        Assert.Contains(intake.BarValues, v => v is > 0 and <= 100);
        await Screenshots.SaveAsync(Page, "intake-summary");

        // Bad rows: the whole file is refused, each error naming its row and column.
        var bad = Edit(Edit(NewClaimsCsv(prefix + "B", 5), 2, "claimed_amount", "-5"), 4, "loss_date", "2026-13-01");
        await intake.UploadAsync("bad-claims.csv", System.Text.Encoding.UTF8.GetBytes(bad));
        var (headline, errors) = await intake.RejectionAsync();
        Assert.Contains("rejected, nothing stored; 2 error(s) in 5 row(s)", headline);
        Assert.Contains(errors, e => e is { Row: "2", Column: "claimed_amount", Value: "-5" } && e.Problem.Contains("below the smallest allowed value"));
        Assert.Contains(errors, e => e is { Row: "4", Column: "loss_date" } && e.Problem.Contains("yyyy-MM-dd"));
        await Screenshots.SaveAsync(Page, "intake-errors");

        // The same good file again: every claim a duplicate, nothing stored or queued.
        await intake.UploadAsync("todays-claims.csv", System.Text.Encoding.UTF8.GetBytes(good));
        var again = await intake.SummaryAsync();
        Assert.Equal((Claims, 0, 0, Claims), (again.Rows, again.Stored, again.Queued, again.Duplicates));

        // The queued claims are in the queue; the rejected file's are not.
        await queue.GoToAsync();
        await queue.SearchAsync(prefix, expectedRows: Math.Min(first.Queued, 25));
        // The grid held 25 rows before the search too: wait until the rows shown are the searched ones.
        await Page.WaitForFunctionAsync(
            "p => { const links = [...document.querySelectorAll('[data-testid=claim-link]')]; return links.length > 0 && links.every(a => a.textContent.trim().startsWith(p)); }",
            prefix);
        var shown = await queue.ClaimNumbersAsync();
        Assert.All(shown, n => Assert.StartsWith(prefix, n));
        await queue.SearchAsync(shown[0]);
        await queue.SearchAsync(prefix + "B", expectedRows: 0);
    }

    /// <summary>The demo's open claims (seed-cases/open-claims.csv, in the demo schema), taken in turn under new claim numbers, hidden columns left out.</summary>
    private static string NewClaimsCsv(string prefix, int count)
    {
        var lines = File.ReadAllLines(Path.Combine(AppProcess.RepoRoot, "seed-cases", "open-claims.csv"));
        Assert.DoesNotContain(lines, l => l.Contains('"')); // plain cells: split on commas
        var header = lines[0].Split(',');
        var keep = Enumerable.Range(0, header.Length).Where(i => !header[i].StartsWith('_')).ToArray();
        var number = Array.IndexOf(header, "claim_number");
        var rows = Enumerable.Range(0, count).Select(i =>
        {
            var cells = lines[1 + i % (lines.Length - 1)].Split(',');
            cells[number] = $"{prefix}{i + 1:D5}";
            return string.Join(',', keep.Select(k => cells[k]));
        });
        return string.Join('\n', [string.Join(',', keep.Select(k => header[k])), .. rows]) + "\n";
    }

    private static string Edit(string csv, int row, string column, string value)
    {
        var lines = csv.Split('\n');
        var at = Array.IndexOf(lines[0].Split(','), column);
        var cells = lines[row].Split(',');
        cells[at] = value;
        lines[row] = string.Join(',', cells);
        return string.Join('\n', lines);
    }
}
