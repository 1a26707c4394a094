using System.Net;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.Tests.Support;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests;

public sealed class SignInTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    [Fact]
    public async Task Anonymous_requests_go_to_the_sign_in_page()
    {
        var client = SignInClient.Anonymous(factory);
        var response = await client.GetAsync("/");
        Assert.Equal(HttpStatusCode.Redirect, response.StatusCode);
        Assert.StartsWith("/signin", response.Headers.Location!.AbsolutePath);
        Assert.Equal(HttpStatusCode.Redirect, (await client.GetAsync("/cases/1")).StatusCode);
    }

    [Fact]
    public async Task The_error_page_needs_no_sign_in()
    {
        var response = await SignInClient.Anonymous(factory).GetAsync("/error");
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Contains("Something went wrong", await response.Content.ReadAsStringAsync());
    }

    [Fact]
    public async Task The_sign_in_page_lists_demo_accounts_by_role_with_the_password()
    {
        var html = await SignInClient.Anonymous(factory).GetStringAsync("/signin");
        Assert.Contains("Demo accounts", html);
        Assert.Contains(TinySeed.Password, html);
        foreach (var name in new[] { "Ines Varga", "Tomas Reed", "Mara Holt", "Olu Berg" }) Assert.Contains(name, html);
        Assert.True(html.IndexOf("Investigators", StringComparison.Ordinal) < html.IndexOf("Team leads", StringComparison.Ordinal));
        // Mara is a team lead and an investigator: listed once.
        Assert.Single(System.Text.RegularExpressions.Regex.Matches(html, "demo-name\">Mara Holt<"));
    }

    [Fact]
    public async Task Signing_in_with_the_demo_password_opens_the_queue()
    {
        var client = SignInClient.Anonymous(factory);
        var response = await SignInClient.PostAsync(client, "ines.varga", TinySeed.Password);
        Assert.Equal(HttpStatusCode.Redirect, response.StatusCode);
        Assert.Equal("/", response.Headers.Location!.OriginalString);
        var queue = await client.GetAsync("/");
        Assert.Equal(HttpStatusCode.OK, queue.StatusCode);
        var html = await queue.Content.ReadAsStringAsync();
        Assert.Contains("Ines Varga", html);
        Assert.Contains("Investigator", html);

        var signOut = await client.PostAsync("/account/signout", new FormUrlEncodedContent(new Dictionary<string, string>
        {
            ["__RequestVerificationToken"] = await SignInClient.TokenAsync(client),
        }));
        Assert.Equal(HttpStatusCode.Redirect, signOut.StatusCode);
        Assert.Equal(HttpStatusCode.Redirect, (await client.GetAsync("/")).StatusCode);
    }

    [Fact]
    public async Task A_wrong_password_is_refused_and_five_lock_the_account()
    {
        var client = SignInClient.Anonymous(factory);
        var wrong = await SignInClient.PostAsync(client, "tomas.reed", "not-the-password");
        Assert.Contains("error=invalid", wrong.Headers.Location!.OriginalString);
        for (var i = 0; i < 4; i++) await SignInClient.PostAsync(client, "tomas.reed", "not-the-password");
        var locked = await SignInClient.PostAsync(client, "tomas.reed", TinySeed.Password);
        Assert.Contains("error=locked", locked.Headers.Location!.OriginalString);
        Assert.Contains("locked", await client.GetStringAsync(locked.Headers.Location!.OriginalString));
    }

    [Fact]
    public async Task A_sign_in_post_without_the_antiforgery_token_is_rejected()
    {
        var client = SignInClient.Anonymous(factory);
        var response = await client.PostAsync("/account/signin", new FormUrlEncodedContent(new Dictionary<string, string>
        {
            ["UserName"] = "ines.varga", ["Password"] = TinySeed.Password,
        }));
        Assert.Equal(HttpStatusCode.BadRequest, response.StatusCode);
    }

    [Fact]
    public async Task A_return_url_off_the_site_is_ignored()
    {
        var client = SignInClient.Anonymous(factory);
        var response = await client.PostAsync("/account/signin", new FormUrlEncodedContent(new Dictionary<string, string>
        {
            ["UserName"] = "mara.holt", ["Password"] = TinySeed.Password, ["ReturnUrl"] = "//elsewhere.example/",
            ["__RequestVerificationToken"] = await SignInClient.TokenAsync(client),
        }));
        Assert.Equal("/", response.Headers.Location!.OriginalString);
    }

    [Fact]
    public async Task The_queue_service_returns_scored_cases_and_the_case_page_shows_them()
    {
        int caseId;
        using (var scope = factory.Services.CreateScope())
        {
            var page = await scope.ServiceProvider.GetRequiredService<QueueService>().GetPageAsync(Actor.System, new QueueQuery(PageSize: 50));
            Assert.NotEmpty(page.Rows);
            Assert.All(page.Rows, r => Assert.InRange(r.Probability, 0.25, 1.0));
            Assert.Equal(page.Rows.OrderByDescending(r => r.Probability).Select(r => r.CaseId), page.Rows.Select(r => r.CaseId));
            caseId = page.Rows[0].CaseId;
        }
        var client = SignInClient.Anonymous(factory);
        await SignInClient.PostAsync(client, "olu.berg", TinySeed.Password);
        var html = await client.GetStringAsync($"/cases/{caseId}");
        Assert.Contains("A risk score ranks claims for review; it is not evidence.", html);
        Assert.Contains("Why this score", html);
        Assert.Contains("v1", html);
    }
}
