using System.Net;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Store;
using Triage.Cases.Tests.Support;
using Triage.Web.Components.Pages.Cases;
using Triage.Web.Tests.Support;
using UglyToad.PdfPig;

namespace Triage.Web.Tests.Cases;

public sealed class CaseEndpointTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    /// <summary>An open case assigned to Ines (motor or home, which she works).</summary>
    private async Task<(int Id, string Number)> InesCaseAsync()
    {
        using var scope = factory.Services.CreateScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        var ines = await db.Users.SingleAsync(u => u.UserName == "ines.varga");
        var c = await db.Cases.Where(x => x.IsOpen && x.AssigneeId == null && (x.Line == "motor" || x.Line == "home"))
            .OrderBy(x => x.Id).FirstAsync();
        c.AssignTo(ines, Actor.System, DateTime.UtcNow);
        await db.SaveChangesAsync();
        return (c.Id, c.ClaimNumber);
    }

    private async Task<HttpClient> SignedInAsync(string user)
    {
        var client = SignInClient.Anonymous(factory);
        Assert.Equal(HttpStatusCode.Redirect, (await SignInClient.PostAsync(client, user, TinySeed.Password)).StatusCode);
        return client;
    }

    [Fact]
    public async Task The_report_downloads_as_a_pdf_for_a_reader_and_is_audited()
    {
        var (id, number) = await InesCaseAsync();
        var response = await (await SignedInAsync("olu.berg")).GetAsync($"/cases/{id}/report.pdf");
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("application/pdf", response.Content.Headers.ContentType!.MediaType);
        using var pdf = PdfDocument.Open(await response.Content.ReadAsByteArrayAsync());
        var text = string.Join(" ", pdf.GetPages().SelectMany(p => p.GetWords()).Select(w => w.Text));
        Assert.Contains($"Case report · {number}", text);
        Assert.Contains("by olu.berg", text);

        using var scope = factory.Services.CreateScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        Assert.True(await db.AuditEvents.AnyAsync(a => a.CaseId == id && a.What == "report.downloaded" && a.Who == "olu.berg"));
    }

    [Fact]
    public async Task Another_investigator_gets_no_report_and_no_case_page_for_someone_elses_case()
    {
        var (id, _) = await InesCaseAsync();
        var tomas = await SignedInAsync("tomas.reed");
        var report = await tomas.GetAsync($"/cases/{id}/report.pdf");
        Assert.Equal(HttpStatusCode.Forbidden, report.StatusCode);
        Assert.Contains("assigned to Ines Varga", await report.Content.ReadAsStringAsync());
        var page = await tomas.GetStringAsync($"/cases/{id}");
        Assert.Contains("assigned to Ines Varga", page);
        Assert.DoesNotContain("driver-chart", page);
    }

    [Fact]
    public async Task The_assignee_sees_the_caution_chart_checks_and_verdict_form()
    {
        var (id, number) = await InesCaseAsync();
        var html = System.Net.WebUtility.HtmlDecode(await (await SignedInAsync("ines.varga")).GetStringAsync($"/cases/{id}"));
        Assert.Contains($"Case {number}", html);
        Assert.Contains(CaseFacts.Caution, html);
        Assert.Contains("class=\"driver-chart\"", html);
        Assert.Contains("Rank in today's queue", html);
        Assert.Contains("Suggested checks", html);
        Assert.Contains("id=\"verdict-outcome\"", html);
        Assert.Contains("Download case report", html);
    }
}
