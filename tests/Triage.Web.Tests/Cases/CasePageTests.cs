using System.Security.Claims;
using Bunit;
using Microsoft.AspNetCore.Components;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;
using Triage.Web.Components.Pages.Cases;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Cases;

/// <summary>The interactive case page over the real app's services, signed in as the assignee.</summary>
public sealed class CasePageTests(TriageWebFactory factory) : ComponentTest, IClassFixture<TriageWebFactory>
{
    private async Task<(int Id, TriageUser Ines)> InesCaseAsync()
    {
        using var scope = factory.Services.CreateScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        var ines = await db.Users.SingleAsync(u => u.UserName == "ines.varga");
        var c = await db.Cases.Where(x => x.IsOpen && x.AssigneeId == null && (x.Line == "motor" || x.Line == "home") && x.Checks.Any())
            .OrderByDescending(x => x.Id).FirstAsync();
        c.AssignTo(ines, Actor.System, DateTime.UtcNow);
        await db.SaveChangesAsync();
        return (c.Id, ines);
    }

    private IRenderedComponent<CasePage> Render(int id, TriageUser user)
    {
        // The page opens a scope per action; each gets the real app's services through a scope of the app.
        Ctx.Services.AddScoped(_ => new AppScope(factory.Services.CreateScope()));
        Ctx.Services.AddScoped(sp => sp.GetRequiredService<AppScope>().Services.GetRequiredService<CaseWorkService>());
        Ctx.Services.AddSingleton(factory.Services.GetRequiredService<CaseEvents>());
        var auth = Ctx.AddAuthorization();
        auth.SetAuthorized(user.UserName!);
        auth.SetRoles(Roles.Investigator);
        auth.SetClaims(new System.Security.Claims.Claim(ClaimTypes.NameIdentifier, user.Id));
        Ctx.SetRendererInfo(new RendererInfo("Server", isInteractive: true));
        return Ctx.Render<CasePage>(p => p.Add(x => x.Id, id));
    }

    private async Task<T> WorkAsync<T>(Func<CaseWorkService, Task<T>> call)
    {
        await using var scope = factory.Services.CreateAsyncScope();
        return await call(scope.ServiceProvider.GetRequiredService<CaseWorkService>());
    }

    private static Actor Lead => new("lead-id", "mara.holt", new HashSet<string> { Roles.TeamLead });

    [Fact]
    public async Task A_note_added_elsewhere_appears_without_a_reload()
    {
        var (id, ines) = await InesCaseAsync();
        var cut = Render(id, ines);
        cut.WaitForAssertion(() => Assert.Contains("Suggested checks", cut.Markup));

        var file = await WorkAsync(s => s.OpenAsync(id, Lead));
        await WorkAsync(async s => { await s.AddNoteAsync(id, "Lead: call the garage first.", file.Stamp, Lead); return 0; });

        cut.WaitForAssertion(() =>
        {
            Assert.Contains("Lead: call the garage first.", cut.Markup);
            Assert.Contains("This case was just updated (note added)", cut.Markup);
        });
    }

    [Fact]
    public async Task A_verdict_after_someone_else_changed_the_case_is_refused_with_what_changed()
    {
        var (id, ines) = await InesCaseAsync();
        var cut = Render(id, ines);
        cut.WaitForAssertion(() => Assert.NotNull(cut.Find("#verdict-outcome")));
        // A write that bypasses the service publishes nothing, so the page keeps the version it loaded.
        await using (var scope = factory.Services.CreateAsyncScope())
        {
            var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
            var c = await db.Cases.SingleAsync(x => x.Id == id);
            c.AddNote("Written straight to the store.", Lead, DateTime.UtcNow);
            await db.SaveChangesAsync();
        }
        cut.Find("#verdict-outcome").Change(nameof(VerdictOutcome.NotFraud));
        cut.Find("#verdict-reason").Change("Facts verified with documents");
        cut.Find("form.verdict-form").Submit();

        cut.WaitForAssertion(() =>
        {
            Assert.Contains("changed after you opened it: mara.holt added a note", cut.Markup);
            Assert.Contains("Written straight to the store.", cut.Markup);
        });
        await using var check = factory.Services.CreateAsyncScope();
        Assert.True((await check.ServiceProvider.GetRequiredService<TriageDbContext>().Cases.SingleAsync(x => x.Id == id)).IsOpen);
    }

    [Fact]
    public async Task Ticking_a_check_and_recording_a_verdict_close_the_case()
    {
        var (id, ines) = await InesCaseAsync();
        var cut = Render(id, ines);
        cut.WaitForAssertion(() => Assert.NotNull(cut.Find("#verdict-outcome")));
        cut.Find("input.check-note").Change("Checked with the broker");
        cut.Find("button.check-done-button").Click();
        cut.WaitForAssertion(() =>
        {
            Assert.Contains("Done by ines.varga", cut.Markup);
            Assert.Contains(": Checked with the broker", cut.Markup);
            Assert.Contains("In review", cut.Markup);
        });
        cut.Find("#verdict-outcome").Change(nameof(VerdictOutcome.Inconclusive));
        cut.Find("#verdict-reason").Change("Evidence insufficient either way");
        cut.Find("form.verdict-form").Submit();
        cut.WaitForAssertion(() =>
        {
            Assert.Contains("Verdict saved.", cut.Markup);
            Assert.Contains("Inconclusive</b> — Evidence insufficient either way", cut.Markup);
            Assert.Contains("Amend the verdict", cut.Markup);
        });
        await using var scope = factory.Services.CreateAsyncScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        var c = await db.Cases.Include(x => x.Audit).SingleAsync(x => x.Id == id);
        Assert.Equal(CaseStatus.Closed, c.Status);
        Assert.Contains(c.Audit, a => a is { What: "case.file-opened", Who: "ines.varga" });
    }
}

internal sealed class AppScope(IServiceScope scope) : IDisposable
{
    public IServiceProvider Services => scope.ServiceProvider;
    public void Dispose() => scope.Dispose();
}
