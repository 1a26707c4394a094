using System.Net;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cases.Store;
using Triage.Cases.Tests.Support;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Export;

public sealed class ExportAndDriftPageTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    private static readonly Actor Admin = new("admin", "admin", new HashSet<string> { Roles.Admin });

    private async Task<HttpClient> SignedInAsync(string user)
    {
        var client = SignInClient.Anonymous(factory);
        Assert.Equal(HttpStatusCode.Redirect, (await SignInClient.PostAsync(client, user, TinySeed.Password)).StatusCode);
        return client;
    }

    private async Task<int> CountAsync(ExportFilter filter)
    {
        using var scope = factory.Services.CreateScope();
        return await scope.ServiceProvider.GetRequiredService<OutcomeExportService>().CountAsync(Admin, filter, default);
    }

    [Fact]
    public async Task An_analyst_downloads_csv_and_parquet_with_the_filters_and_it_is_audited()
    {
        var olu = await SignedInAsync("olu.berg");
        var csv = await olu.GetAsync("/export/outcomes.csv?line=motor&inconclusive=true");
        Assert.Equal(HttpStatusCode.OK, csv.StatusCode);
        Assert.Equal("text/csv", csv.Content.Headers.ContentType!.MediaType);
        Assert.EndsWith(".csv", csv.Content.Headers.ContentDisposition!.FileName!.Trim('"'));
        var lines = (await csv.Content.ReadAsStringAsync()).Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        Assert.StartsWith("claim_number,line_of_business,case_opened_at,verdict_at,outcome,label,score,model_version,audit_sample,selection_probability,", lines[0]);
        var expected = await CountAsync(new ExportFilter(Line: "motor", IncludeInconclusive: true));
        Assert.True(expected > 0);
        Assert.Equal(expected + 1, lines.Length);

        var parquet = await olu.GetAsync("/export/outcomes.parquet?pseudonymise=true");
        Assert.Equal(HttpStatusCode.OK, parquet.StatusCode);
        var bytes = await parquet.Content.ReadAsByteArrayAsync();
        Assert.Equal("PAR1", System.Text.Encoding.ASCII.GetString(bytes, 0, 4));
        Assert.Equal("PAR1", System.Text.Encoding.ASCII.GetString(bytes, bytes.Length - 4, 4));

        using var scope = factory.Services.CreateScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        var audit = await db.AuditEvents.Where(a => a.What == "outcomes.exported" && a.Who == "olu.berg").Select(a => a.Detail).ToListAsync();
        Assert.Contains($"csv, all verdict dates, line motor, all models, inconclusive included: {expected} row(s)", audit);
        Assert.Contains(audit, d => d!.StartsWith("parquet, all verdict dates, all lines, all models, inconclusive left out, pseudonymised: "));
    }

    [Fact]
    public async Task An_investigator_is_refused_and_bad_requests_say_what_is_wrong()
    {
        var ines = await SignedInAsync("ines.varga");
        var refused = await ines.GetAsync("/export/outcomes.csv");
        Assert.Equal(HttpStatusCode.Forbidden, refused.StatusCode);
        Assert.Contains("Analyst or Admin", await refused.Content.ReadAsStringAsync());

        var olu = await SignedInAsync("olu.berg");
        var bad = await olu.GetAsync("/export/outcomes.csv?to=2027-13-01");
        Assert.Equal(HttpStatusCode.BadRequest, bad.StatusCode);
        Assert.Contains("'to' must be a date as yyyy-MM-dd (got '2027-13-01')", await bad.Content.ReadAsStringAsync());
        Assert.Equal(HttpStatusCode.BadRequest, (await olu.GetAsync("/export/outcomes.csv?pseudonymise=maybe")).StatusCode);
        var format = await olu.GetAsync("/export/outcomes.xlsx");
        Assert.Equal(HttpStatusCode.NotFound, format.StatusCode);
        Assert.Contains("use outcomes.csv or outcomes.parquet", await format.Content.ReadAsStringAsync());
        Assert.Equal(HttpStatusCode.Redirect, (await SignInClient.Anonymous(factory).GetAsync("/export/outcomes.csv")).StatusCode);
    }

    [Fact]
    public async Task The_export_and_drift_pages_render_for_an_analyst_with_real_figures()
    {
        var olu = await SignedInAsync("olu.berg");
        var export = await olu.GetStringAsync("/export");
        Assert.Contains("data-testid=\"export-count\"", export);
        Assert.Contains((await CountAsync(new ExportFilter())).ToString("N0"), export);

        var drift = await olu.GetStringAsync("/models/drift");
        Assert.Contains("data-testid=\"drift-table\"", drift);
        Assert.Contains("data-testid=\"psi-chart\"", drift);
        Assert.Contains("Line of business", drift);
        Assert.DoesNotContain("drift-unavailable", drift);

        // An investigator is sent away from both pages.
        var ines = await SignedInAsync("ines.varga");
        Assert.NotEqual(HttpStatusCode.OK, (await ines.GetAsync("/models/drift")).StatusCode);
        Assert.NotEqual(HttpStatusCode.OK, (await ines.GetAsync("/export")).StatusCode);
    }
}
