using System.Net;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Insights;
using Triage.Cases.Tests.Support;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Insights;

public sealed class InsightsEndpointTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    private static readonly Actor Admin = new("admin", "admin", new HashSet<string> { Roles.Admin });

    private async Task<HttpClient> SignedInAsync(string user)
    {
        var client = SignInClient.Anonymous(factory);
        Assert.Equal(HttpStatusCode.Redirect, (await SignInClient.PostAsync(client, user, TinySeed.Password)).StatusCode);
        return client;
    }

    private async Task<IReadOnlyList<HitRateRow>> DriversAsync(InsightFilter filter)
    {
        using var scope = factory.Services.CreateScope();
        return await scope.ServiceProvider.GetRequiredService<InsightsService>().ByDriverAsync(Admin, filter, default);
    }

    [Fact]
    public async Task Driver_table_downloads_as_csv_with_the_filters_applied()
    {
        var olu = await SignedInAsync("olu.berg"); // Analyst and Admin: admins may read insights
        var all = await olu.GetAsync("/insights/drivers.csv");
        Assert.Equal(HttpStatusCode.OK, all.StatusCode);
        Assert.Equal("text/csv", all.Content.Headers.ContentType!.MediaType);
        var lines = (await all.Content.ReadAsStringAsync()).Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        Assert.Equal("driver,key,confirmed,not_fraud,inconclusive,decided,hit_rate,wilson95_low,wilson95_high,too_few", lines[0]);
        var expected = await DriversAsync(new InsightFilter());
        Assert.NotEmpty(expected); // first start closed cases for the holdout history
        Assert.Equal(expected.Count + 1, lines.Length);
        Assert.StartsWith($"{expected[0].Label},{expected[0].Key},{expected[0].Confirmed},{expected[0].NotFraud},", lines[1]);

        var motor = await (await olu.GetAsync("/insights/drivers.csv?line=motor&to=2100-01-01")).Content.ReadAsStringAsync();
        var expectedMotor = await DriversAsync(new InsightFilter(To: new DateOnly(2100, 1, 1), Line: "motor"));
        Assert.Equal(expectedMotor.Count + 1, motor.Split('\n', StringSplitOptions.RemoveEmptyEntries).Length);
        Assert.True(expectedMotor.Sum(r => r.Decided) < expected.Sum(r => r.Decided));
    }

    [Fact]
    public async Task Every_table_downloads_and_bad_requests_say_what_is_wrong()
    {
        var olu = await SignedInAsync("olu.berg");
        foreach (var table in Triage.Web.Insights.InsightsEndpoints.Tables)
            Assert.Equal(HttpStatusCode.OK, (await olu.GetAsync($"/insights/{table}.csv")).StatusCode);
        var bad = await olu.GetAsync("/insights/months.csv?from=31/01/2027");
        Assert.Equal(HttpStatusCode.BadRequest, bad.StatusCode);
        Assert.Contains("'from' must be a date as yyyy-MM-dd (got '31/01/2027')", await bad.Content.ReadAsStringAsync());
        var missing = await olu.GetAsync("/insights/people.csv");
        Assert.Equal(HttpStatusCode.NotFound, missing.StatusCode);
        Assert.Contains("no insight table 'people'", await missing.Content.ReadAsStringAsync());
    }

    [Fact]
    public async Task The_page_shows_the_driver_table_chart_and_caution_to_an_admin()
    {
        var html = await (await SignedInAsync("olu.berg")).GetStringAsync("/insights");
        Assert.Contains("data-testid=\"driver-chart\"", html);
        Assert.Contains("data-testid=\"driver-table\"", html);
        Assert.Contains("it is not evidence", html);
        Assert.Contains("href=\"/insights/drivers.csv\"", html);
        Assert.Contains((await DriversAsync(new InsightFilter()))[0].Label, html);
    }

    [Fact]
    public async Task An_investigator_gets_neither_the_csv_nor_the_page()
    {
        var tomas = await SignedInAsync("tomas.reed");
        var csv = await tomas.GetAsync("/insights/drivers.csv");
        Assert.Equal(HttpStatusCode.Forbidden, csv.StatusCode);
        Assert.Contains("needs the role Manager or Admin", await csv.Content.ReadAsStringAsync());
        var page = await tomas.GetAsync("/insights");
        Assert.Equal(HttpStatusCode.Redirect, page.StatusCode);
        Assert.StartsWith("/signin", page.Headers.Location!.PathAndQuery);
        Assert.DoesNotContain("nav-insights", await tomas.GetStringAsync("/queue"));
    }
}
