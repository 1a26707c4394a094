using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>An analyst retrains, compares, promotes and rolls back, in a real browser against the embedded default.</summary>
public sealed class AnalystModelFlowTests(AppProcess app) : OneBrowserTest(app)
{
    // The demo analyst (seed-cases/team.json).
    private const string Analyst = "Anouk Yarrowtor";
    // First start trains v1; the retrain registers the next number.
    private const string Champion = "v1";
    private const string Challenger = "v2";

    [Fact]
    public async Task Analyst_retrains_compares_promotes_and_rolls_back()
    {
        var queue = await new SignInPage(Page, App.BaseUrl).AsDemoAccountAsync(Analyst);
        // An open case whose model version shows which model scored it; re-scoring on promotion changes it.
        var caseLink = await queue.ClaimLinks.First.GetAttributeAsync("href") ?? throw new InvalidOperationException("no case link in the queue");
        Assert.Equal(Champion, await CaseModelAsync(caseLink));

        var models = new ModelsView(Page);
        await models.OpenFromNavigationAsync();
        Assert.Equal([Champion], await models.VersionNamesAsync());
        Assert.Equal("serving", await models.StatusAsync(Champion));

        // Retrain: a small FastTree keeps the run short on the demo data.
        await models.WaitUntilLiveAsync("FastTree");
        await models.SetTreesAsync(30);
        await models.StartRetrainAsync();
        // Usually still running here (stage and progress bar); the picture is for the guide, nothing is asserted on it.
        await Screenshots.SaveAsync(Page, "models-retrain");
        var result = await models.WaitForRetrainToFinishAsync();
        Assert.Contains($"Challenger {Challenger} is ready to compare", result);
        await Assertions.Expect(models.Row(Challenger)).ToBeVisibleAsync();
        Assert.Equal("challenger", await models.StatusAsync(Challenger));
        Assert.Equal("serving", await models.StatusAsync(Champion));

        // Compare: real figures for both models on the same holdout, and both ROC curves drawn.
        await models.OpenComparisonAsync(Challenger);
        await Assertions.Expect(models.Comparison).ToContainTextAsync($"{Challenger} against {Champion}");
        var (championAuc, challengerAuc) = await models.MeasureAsync("ROC AUC");
        // Both rank fraud well above chance (0.5) on the demo, which has real signal; neither can be perfect on noisy labels.
        Assert.InRange(championAuc, 0.55, 0.999);
        Assert.InRange(challengerAuc, 0.55, 0.999);
        var (championBrier, challengerBrier) = await models.MeasureAsync("Brier score (lower is better)");
        Assert.InRange(championBrier, 0.0001, 0.25);
        Assert.InRange(challengerBrier, 0.0001, 0.25);
        var (championPoints, challengerPoints) = await models.RocPointCountsAsync();
        Assert.True(championPoints > 10 && challengerPoints > 10, $"ROC curves drawn through {championPoints} and {challengerPoints} points");
        Assert.True(await Page.GetByTestId("importance-table").Locator("tbody tr").CountAsync() > 3);
        // The comparison's heading just under the app bar, so the picture starts with what is compared.
        await models.Comparison.EvaluateAsync("e => { e.scrollIntoView({ block: 'start' }); window.scrollBy(0, -72); }");
        await Screenshots.SaveAsync(Page, "models-compare");

        // Promote with a note and re-score the open cases: the challenger serves and the case shows it.
        const string promoteNote = "Challenger ranks the holdout better; trial for a week";
        await models.PromoteAsync(Challenger, promoteNote, rescore: true);
        Assert.Equal("retired", await models.StatusAsync(Champion));
        await Assertions.Expect(models.Row(Challenger)).ToContainTextAsync(promoteNote);
        await Assertions.Expect(Page.GetByTestId($"rollback-{Champion}")).ToBeVisibleAsync();
        await Page.EvaluateAsync("() => window.scrollTo(0, 0)");
        await Screenshots.SaveAsync(Page, "models-versions");
        Assert.Equal(Challenger, await CaseModelAsync(caseLink));
        // What the replaced model said stays on the case.
        Assert.Equal([Champion], await EarlierModelsAsync());

        // Roll back to the first model, again re-scoring: it serves and the case is scored by it once more.
        await models.OpenFromNavigationAsync();
        await models.RollBackAsync(Champion, "Back to v1 while the team reviews the new drivers", rescore: true);
        Assert.Equal("retired", await models.StatusAsync(Challenger));
        await Assertions.Expect(Page.GetByTestId("version-history")).ToContainTextAsync("rolled back to by");
        await Assertions.Expect(Page.GetByTestId("model-activity")).ToContainTextAsync("model.rolled-back");
        Assert.Equal(Champion, await CaseModelAsync(caseLink));
        Assert.Equal([Challenger, Champion], await EarlierModelsAsync());
    }

    /// <summary>The models that scored the open case before it was re-scored, most recently replaced first.</summary>
    private async Task<IReadOnlyList<string>> EarlierModelsAsync() =>
        (await Page.GetByTestId("earlier-model").AllInnerTextsAsync()).Select(t => t.Trim()).ToList();

    /// <summary>Opens a case page and reads the version of the model that scored the case.</summary>
    private async Task<string> CaseModelAsync(string caseLink)
    {
        await Page.GotoAsync(new Uri(App.BaseUrl, caseLink).ToString());
        var view = await CaseView.WaitAsync(Page);
        await view.WaitForDriversAndChecksAsync();
        return (await Page.GetByTestId("model-version").InnerTextAsync()).Trim();
    }
}
