using System.Security.Claims;
using Bunit;
using Microsoft.AspNetCore.Components;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;
using Triage.Cases.TeamLead;
using Triage.Web.Components.Pages.Team;
using Triage.Web.Tests.Cases;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Team;

/// <summary>The interactive team page over the real app's services and the tiny seed's team.</summary>
public sealed class TeamPageTests(TriageWebFactory factory) : ComponentTest, IClassFixture<TriageWebFactory>
{
    private IRenderedComponent<TeamPage> Render(string userName, params string[] roles)
    {
        Ctx.Services.AddScoped(_ => new AppScope(factory.Services.CreateScope()));
        Ctx.Services.AddScoped(sp => sp.GetRequiredService<AppScope>().Services.GetRequiredService<WorkloadService>());
        Ctx.Services.AddScoped(sp => sp.GetRequiredService<AppScope>().Services.GetRequiredService<ReassignService>());
        Ctx.Services.AddScoped(sp => sp.GetRequiredService<AppScope>().Services.GetRequiredService<AbsenceService>());
        Ctx.Services.AddScoped(sp => sp.GetRequiredService<AppScope>().Services.GetRequiredService<AutoBalanceService>());
        Ctx.Services.AddSingleton(factory.Services.GetRequiredService<CaseEvents>());
        using (var scope = factory.Services.CreateScope())
        {
            var id = scope.ServiceProvider.GetRequiredService<TriageDbContext>().Users.Single(u => u.UserName == userName).Id;
            var auth = Ctx.AddAuthorization();
            auth.SetAuthorized(userName);
            auth.SetRoles(roles);
            auth.SetClaims(new System.Security.Claims.Claim(ClaimTypes.NameIdentifier, id));
        }
        Ctx.SetRendererInfo(new RendererInfo("Server", isInteractive: true));
        return Ctx.Render<TeamPage>();
    }

    [Fact]
    public async Task A_case_moved_elsewhere_updates_the_workload_without_a_reload()
    {
        var page = Render("mara.holt", Roles.TeamLead);
        page.WaitForAssertion(() => Assert.NotEmpty(page.FindAll("[data-testid='person-ines.varga']")));
        int Open() => int.Parse(page.Find("[data-testid='person-ines.varga'] [data-testid=open]").TextContent);
        var before = Open();

        await using (var scope = factory.Services.CreateAsyncScope())
        {
            var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
            var ines = await db.Users.SingleAsync(u => u.UserName == "ines.varga");
            var c = await db.Cases.Where(x => x.IsOpen && x.AssigneeId == null && (x.Line == "motor" || x.Line == "home")).Select(x => new { x.Id, x.Version }).FirstAsync();
            await scope.ServiceProvider.GetRequiredService<ReassignService>().ReassignAsync([new CaseSeen(c.Id, c.Version)], ines.Id, "cover",
                new Actor("lead", "mara.holt", new HashSet<string> { Roles.TeamLead }));
        }

        page.WaitForAssertion(() => Assert.Equal(before + 1, Open()), TimeSpan.FromSeconds(5));
    }

    [Fact]
    public void A_lead_plans_the_balance_before_anything_changes()
    {
        var page = Render("mara.holt", Roles.TeamLead);
        page.WaitForAssertion(() => page.Find("[data-testid=plan-make]"));
        page.Find("[data-testid=plan-make]").Click();
        page.WaitForAssertion(() => page.Find("[data-testid=plan-summary]"));
        Assert.NotNull(page.Find("[data-testid=plan-apply]"));
    }

    [Fact]
    public void A_manager_reads_the_page_but_gets_no_actions()
    {
        var page = Render("mara.holt", Roles.Manager);
        page.WaitForAssertion(() => page.Find("[data-testid=read-only]"));
        Assert.Empty(page.FindAll("[data-testid=plan-make]"));
        page.Find("[data-testid='person-ines.varga'] [data-testid=show-cases]").Click();
        page.WaitForAssertion(() => Assert.Contains("Open cases of Ines Varga", page.Find("[data-testid=cases-title]").TextContent));
        Assert.Empty(page.FindAll("[data-testid=pick]"));
        Assert.Empty(page.FindAll("[data-testid=move-bar]"));
        Assert.Empty(page.FindAll("[data-testid=mark-absent]"));
    }
}
