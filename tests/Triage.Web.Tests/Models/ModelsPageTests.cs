using System.Security.Claims;
using Bunit;
using Microsoft.AspNetCore.Components;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Options;
using Microsoft.Extensions.Time.Testing;
using Triage.Cases.Domain;
using Triage.Cases.Instances;
using Triage.Cases.Models;
using Triage.Cases.Operations;
using Triage.Cases.Store;
using Triage.Scoring;
using Triage.Web.Components.Pages.Models;
using Triage.Web.Tests.Cases;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Models;

/// <summary>
/// The models page's activity list follows a retrain while it runs. The page gets the real registry and
/// retrain service over the real store, but a retrain state, queue and locks of its own that no worker reads, so a
/// started run stays in progress for as long as the test looks at it (and, never ending, holds no lock on the
/// shared store that the next test's run would wait behind).
/// </summary>
public sealed class ModelsPageTests(TriageWebFactory factory) : ComponentTest, IClassFixture<TriageWebFactory>
{
    private readonly RetrainState _state = new(factory.Services.GetRequiredService<TriageMetrics>());
    private readonly RetrainQueue _queue = new();
    // The tests here share one store and the list is newest first: each test's clock starts a day after the
    // last one's (xunit makes the instance just before running the test), all later than anything the seed wrote.
    private static int _tests;
    private readonly FakeTimeProvider _clock = new(new DateTimeOffset(2031, 3, 2, 9, 0, 0, TimeSpan.Zero).AddDays(Interlocked.Increment(ref _tests)));

    private RetrainService Service(IServiceProvider app) => new(_state, _queue, app.GetRequiredService<IServiceScopeFactory>(),
        app.GetRequiredService<TriageDbContext>(), new AlwaysFree(), app.GetRequiredService<InstanceId>(),
        app.GetRequiredService<IOptions<ScoringOptions>>(), _clock);

    private async Task<Actor> AnalystAsync()
    {
        await using var scope = factory.Services.CreateAsyncScope();
        var olu = await scope.ServiceProvider.GetRequiredService<TriageDbContext>().Users.SingleAsync(u => u.UserName == "olu.berg");
        return new Actor(olu.Id, olu.UserName!, new HashSet<string> { Roles.Analyst, Roles.Admin });
    }

    private IRenderedComponent<ModelsPage> RenderAs(Actor analyst)
    {
        Ctx.Services.AddScoped(_ => new AppScope(factory.Services.CreateScope()));
        Ctx.Services.AddScoped(sp => sp.GetRequiredService<AppScope>().Services.GetRequiredService<ModelRegistry>());
        Ctx.Services.AddScoped(sp => Service(sp.GetRequiredService<AppScope>().Services));
        Ctx.Services.AddSingleton(_state);
        Ctx.Services.AddSingleton<TimeProvider>(_clock);
        var auth = Ctx.AddAuthorization();
        auth.SetAuthorized(analyst.UserName);
        auth.SetRoles(Roles.Analyst, Roles.Admin);
        auth.SetClaims(new System.Security.Claims.Claim(ClaimTypes.NameIdentifier, analyst.UserId));
        Ctx.SetRendererInfo(new RendererInfo("Server", isInteractive: true));
        Ctx.Render<MudBlazor.MudPopoverProvider>();
        var page = Ctx.Render<ModelsPage>();
        page.WaitForAssertion(() => Assert.NotEmpty(page.FindAll("[data-testid=version-name]")));
        return page;
    }

    [Fact]
    public async Task Starting_a_retrain_lists_it_under_recent_activity_while_it_runs_and_so_does_cancelling()
    {
        var page = RenderAs(await AnalystAsync());
        Assert.DoesNotContain("model.retrain-started", Newest(page));

        await page.Find("[data-testid=retrain-start]").ClickAsync(new());

        page.WaitForAssertion(() => Assert.Contains("· model.retrain-started ·", Newest(page)));
        Assert.NotNull(_state.Current);
        Assert.NotEmpty(page.FindAll("[data-testid=retrain-progress]"));

        await page.Find("[data-testid=retrain-cancel]").ClickAsync(new());

        page.WaitForAssertion(() => Assert.Contains("· model.retrain-cancel ·", Newest(page)));
        Assert.True(_state.Current?.CancelRequested);
    }

    [Fact]
    public async Task A_retrain_started_and_cancelled_in_another_session_shows_up_while_it_runs()
    {
        var analyst = await AnalystAsync();
        var page = RenderAs(analyst);
        Assert.DoesNotContain("model.retrain-started", Newest(page));

        await using (var scope = factory.Services.CreateAsyncScope())
            await Service(scope.ServiceProvider).StartAsync(analyst, scope.ServiceProvider.GetRequiredService<IOptions<ScoringOptions>>().Value);
        page.WaitForAssertion(() => Assert.NotEmpty(page.FindAll("[data-testid=retrain-progress]")));
        // The state announces the run before its audit line is saved; the page re-reads the list while the run lasts.
        _clock.Advance(ModelsPage.PollEvery);
        page.WaitForAssertion(() => Assert.Contains("· model.retrain-started ·", Newest(page)));

        await using (var scope = factory.Services.CreateAsyncScope())
            await Service(scope.ServiceProvider).CancelAsync(analyst);
        _clock.Advance(ModelsPage.PollEvery);
        page.WaitForAssertion(() => Assert.Contains("· model.retrain-cancel ·", Newest(page)));
        Assert.NotNull(_state.Current);
    }

    /// <summary>The top line of "Recent model activity" (newest first); the tests in this class share one store.</summary>
    private static string Newest(IRenderedComponent<ModelsPage> page) =>
        page.FindAll("[data-testid=activity-line]").Select(e => e.TextContent).FirstOrDefault() ?? "";

    private sealed class AlwaysFree : IClusterLocks, IHeldLock
    {
        public Task<IHeldLock?> TryAcquireAsync(ClusterLock name, CancellationToken ct) => Task.FromResult<IHeldLock?>(this);
        public Task<IHeldLock> AcquireAsync(ClusterLock name, CancellationToken ct) => Task.FromResult<IHeldLock>(this);
        public Task<bool> StillHeldAsync(CancellationToken ct) => Task.FromResult(true);
        public void Dispose() { }
    }
}
