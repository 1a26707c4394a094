using Microsoft.Playwright;

namespace Triage.EndToEnd;

/// <summary>Saves screenshots with the test results and copies them into docs/images for the user guide.</summary>
public static class Screenshots
{
    public static async Task SaveAsync(IPage page, string name)
    {
        var results = Path.Combine(AppProcess.RepoRoot, "TestResults", "screenshots");
        var docs = Path.Combine(AppProcess.RepoRoot, "docs", "images");
        Directory.CreateDirectory(results);
        Directory.CreateDirectory(docs);
        var file = Path.Combine(results, name + ".png");
        await page.ScreenshotAsync(new() { Path = file, FullPage = false });
        // Written beside, then renamed: a half-written image never lands in docs.
        var temp = Path.Combine(docs, name + ".png.tmp");
        File.Copy(file, temp, overwrite: true);
        File.Move(temp, Path.Combine(docs, name + ".png"), overwrite: true);
    }
}
