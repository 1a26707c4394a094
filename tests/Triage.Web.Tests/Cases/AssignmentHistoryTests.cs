using System.Security.Claims;
using Bunit;
using Microsoft.AspNetCore.Components;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;
using Triage.Cases.TeamLead;
using Triage.Web.Components.Pages.Cases;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Cases;

/// <summary>The case page lists every assignment change, newest first, and takes in a team lead's moves while it is open.</summary>
public sealed class AssignmentHistoryTests(TriageWebFactory factory) : ComponentTest, IClassFixture<TriageWebFactory>
{
    private static readonly Actor Lead = new("lead-id", "mara.holt", new HashSet<string> { Roles.TeamLead });

    private IRenderedComponent<CasePage> RenderAsLead(int caseId, string leadId)
    {
        Ctx.Services.AddScoped(_ => new AppScope(factory.Services.CreateScope()));
        Ctx.Services.AddScoped(sp => sp.GetRequiredService<AppScope>().Services.GetRequiredService<CaseWorkService>());
        Ctx.Services.AddSingleton(factory.Services.GetRequiredService<CaseEvents>());
        var auth = Ctx.AddAuthorization();
        auth.SetAuthorized("mara.holt");
        auth.SetRoles(Roles.TeamLead);
        auth.SetClaims(new System.Security.Claims.Claim(ClaimTypes.NameIdentifier, leadId));
        Ctx.SetRendererInfo(new RendererInfo("Server", isInteractive: true));
        return Ctx.Render<CasePage>(p => p.Add(x => x.Id, caseId));
    }

    /// <summary>Moves the case as a team lead would on the team page, from its current version.</summary>
    private async Task MoveAsync(int caseId, string? toUserName, string reason)
    {
        await using var scope = factory.Services.CreateAsyncScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        var reassign = scope.ServiceProvider.GetRequiredService<ReassignService>();
        var seen = await db.Cases.AsNoTracking().Where(c => c.Id == caseId).Select(c => new CaseSeen(c.Id, c.Version)).SingleAsync();
        if (toUserName is null) await reassign.ReturnToPoolAsync([seen], reason, Lead);
        else await reassign.ReassignAsync([seen], (await db.Users.SingleAsync(u => u.UserName == toUserName)).Id, reason, Lead);
    }

    [Fact]
    public async Task Each_reassignment_shows_who_from_whom_to_whom_and_why_newest_first_and_live()
    {
        int caseId;
        string leadId;
        await using (var scope = factory.Services.CreateAsyncScope())
        {
            var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
            leadId = (await db.Users.SingleAsync(u => u.UserName == "mara.holt")).Id;
            caseId = await db.Cases.Where(c => c.IsOpen && c.AssigneeId == null && c.Line == "motor")
                .OrderByDescending(c => c.Id).Select(c => c.Id).FirstAsync();
        }
        var page = RenderAsLead(caseId, leadId);
        page.WaitForAssertion(() => page.Find("[data-testid=assignments-none]"));

        await MoveAsync(caseId, "ines.varga", "Ines knows the repairer");
        page.WaitForAssertion(() => Assert.Equal(["From the pool to Ines Varga"], Moves(page)), TimeSpan.FromSeconds(5));

        await MoveAsync(caseId, "mara.holt", "Ines is away next week");
        await MoveAsync(caseId, null, "Free for take next");

        page.WaitForAssertion(() => Assert.Equal(
            ["From Mara Holt back to the pool", "From Ines Varga to Mara Holt", "From the pool to Ines Varga"], Moves(page)), TimeSpan.FromSeconds(5));
        Assert.Equal(["Free for take next", "Ines is away next week", "Ines knows the repairer"],
            page.FindAll("[data-testid=assignment-reason]").Select(e => e.TextContent.Trim()));
        Assert.All(page.FindAll("[data-testid=assignment] .timeline-when"), e => Assert.EndsWith("by Mara Holt", e.TextContent.Trim()));
        Assert.Contains("This case was just updated", page.Markup);

        // The same three moves are in the audit trail, which the list must agree with.
        await using var check = factory.Services.CreateAsyncScope();
        var audit = await check.ServiceProvider.GetRequiredService<TriageDbContext>().AuditEvents.AsNoTracking()
            .Where(a => a.CaseId == caseId && (a.What == "case.assigned" || a.What == "case.returned")).OrderByDescending(a => a.Id).Select(a => a.What).ToListAsync();
        Assert.Equal(["case.returned", "case.assigned", "case.assigned"], audit);
    }

    private static List<string> Moves(IRenderedComponent<CasePage> page) =>
        page.FindAll("[data-testid=assignment-move]").Select(e => e.TextContent.Trim()).ToList();
}
