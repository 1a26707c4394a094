using Microsoft.Playwright;
using Triage.EndToEnd.Pages;

namespace Triage.EndToEnd;

/// <summary>A team lead balances the day in a real browser while an investigator watches their own queue in another.</summary>
public sealed class TeamLeadFlowTests(AppProcess app) : IClassFixture<AppProcess>, IAsyncLifetime
{
    // Demo people (seed-cases/team.json): a lead, and two investigators who both work motor claims.
    private const string Lead = "Piet Gorsewick";
    private const string From = "Maren Quillfeather", FromUser = "maren.quillfeather";
    private const string To = "Tobin Ashcombe", ToUser = "tobin.ashcombe";
    private readonly Browser _leadBrowser = new(), _investigatorBrowser = new();
    private IPage _lead = default!, _investigator = default!;

    public async Task InitializeAsync()
    {
        await _leadBrowser.InitializeAsync();
        await _investigatorBrowser.InitializeAsync();
        _lead = await _leadBrowser.Context.NewPageAsync();
        _investigator = await _investigatorBrowser.Context.NewPageAsync();
    }

    public async Task DisposeAsync()
    {
        await _leadBrowser.DisposeAsync();
        await _investigatorBrowser.DisposeAsync();
    }

    [Fact]
    public async Task Lead_reassigns_a_case_the_other_investigator_sees_it_live_then_marks_absence_and_auto_balances()
    {
        // The second investigator keeps their own queue open in another browser.
        var tobinQueue = await new SignInPage(_investigator, app.BaseUrl).AsDemoAccountAsync(To);
        await tobinQueue.ShowAsync("Mine");
        var before = await tobinQueue.ClaimNumbersAsync();

        await new SignInPage(_lead, app.BaseUrl).AsDemoAccountAsync(Lead);
        await _lead.GetByTestId("nav-team").ClickAsync();
        var team = new TeamView(_lead, app.BaseUrl);
        await _lead.GetByTestId("workload-table").WaitForAsync();
        await team.ShowCasesOfAsync(FromUser, From);
        var marens = await team.ListedClaimsAsync();
        Assert.NotEmpty(marens);
        var moved = marens[0];
        Assert.DoesNotContain(moved, before);

        await team.TickAsync(moved);
        await team.FillMoveAsync(To, "Maren is in court today");
        await _lead.GetByTestId("cases-panel").ScrollIntoViewIfNeededAsync();
        await Screenshots.SaveAsync(_lead, "team-move");
        await team.SubmitMoveAsync();
        await Assertions.Expect(team.Message).ToContainTextAsync($"Moved 1 case to {To}.");
        Assert.DoesNotContain(moved, await team.ListedClaimsAsync());

        // Tobin's queue shows it without a reload: the page listens for case changes.
        await Assertions.Expect(tobinQueue.ClaimLinks.Filter(new() { HasText = moved })).ToHaveCountAsync(1);

        // Maren is away: mark her absent and put the rest of her cases back in the pool in one action.
        await team.MarkAbsentAsync("court");
        await Assertions.Expect(team.Person(FromUser).GetByTestId("absent")).ToBeVisibleAsync();
        await team.ReturnAllAsync();
        await Assertions.Expect(team.Person(FromUser).GetByTestId("open")).ToHaveTextAsync("0");

        // Auto-balance: the plan is shown first and gives Maren nothing.
        var plan = await team.PlanAsync();
        await Assertions.Expect(plan.GetByTestId("plan-summary")).ToContainTextAsync("Hands out");
        var marenShare = plan.GetByTestId("plan-shares").Locator("tr", new() { HasText = From });
        await Assertions.Expect(marenShare.GetByTestId("gets")).ToHaveTextAsync("0");
        // Tall enough for workload, pool and plan in one picture.
        await _lead.SetViewportSizeAsync(1600, 1250);
        await _lead.EvaluateAsync("() => window.scrollTo(0, 0)");
        await Screenshots.SaveAsync(_lead, "team");
        await _lead.SetViewportSizeAsync(1600, 900);
        await team.ApplyPlanAsync();

        // The lead's case list and Tobin's queue agree with the store: his cases include the moved one.
        await team.ShowCasesOfAsync(ToUser, To);
        Assert.Contains(moved, await team.ListedClaimsAsync());
    }
}
