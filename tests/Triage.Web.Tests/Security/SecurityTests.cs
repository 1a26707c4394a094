using System.Net;
using System.Text;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Support;
using Triage.Web.Security;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Security;

public sealed class SecurityTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    private WebApplicationFactory<Program> WithLimits(int signIns, int apiRequests) => factory.WithWebHostBuilder(b =>
        b.ConfigureAppConfiguration(c => c.AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Security:SignInAttemptsPerMinute"] = signIns.ToString(),
            ["Security:ApiRequestsPerMinute"] = apiRequests.ToString(),
        })));

    [Theory]
    [InlineData("/signin")]
    [InlineData("/error")]
    [InlineData("/")]
    public async Task Every_response_carries_the_security_headers(string path)
    {
        var response = await SignInClient.Anonymous(factory).GetAsync(path);
        var h = response.Headers;
        Assert.Equal(SecurityHeaders.ContentSecurityPolicy, Assert.Single(h.GetValues("Content-Security-Policy")));
        Assert.Equal("DENY", Assert.Single(h.GetValues("X-Frame-Options")));
        Assert.Equal("nosniff", Assert.Single(h.GetValues("X-Content-Type-Options")));
        Assert.Equal("same-origin", Assert.Single(h.GetValues("Referrer-Policy")));
        // CSP Level 3 (W3C): no inline or evaluated script, no framing by other sites.
        Assert.Contains("script-src 'self';", SecurityHeaders.ContentSecurityPolicy);
        Assert.DoesNotContain("unsafe-eval", SecurityHeaders.ContentSecurityPolicy);
        Assert.Contains("frame-ancestors 'none'", SecurityHeaders.ContentSecurityPolicy);
    }

    [Fact]
    public async Task The_sign_in_cookie_is_http_only_and_same_site()
    {
        var client = SignInClient.Anonymous(factory);
        var response = await SignInClient.PostAsync(client, "ines.varga", TinySeed.Password);
        var cookie = Assert.Single(response.Headers.GetValues("Set-Cookie"), c => c.StartsWith(".AspNetCore.Identity.Application=", StringComparison.Ordinal));
        Assert.Contains("httponly", cookie, StringComparison.OrdinalIgnoreCase);
        Assert.Contains("samesite=lax", cookie, StringComparison.OrdinalIgnoreCase);
    }

    [Fact]
    public async Task Sign_in_posts_beyond_the_limit_are_refused_with_429_and_a_retry_time()
    {
        await using var app = WithLimits(signIns: 3, apiRequests: 1000);
        var client = SignInClient.Anonymous(app);
        for (var i = 0; i < 3; i++)
            Assert.NotEqual(HttpStatusCode.TooManyRequests, (await SignInClient.PostAsync(client, "ines.varga", "wrong")).StatusCode);
        var refused = await SignInClient.PostAsync(client, "ines.varga", TinySeed.Password);
        Assert.Equal(HttpStatusCode.TooManyRequests, refused.StatusCode);
        Assert.True(int.Parse(Assert.Single(refused.Headers.GetValues("Retry-After"))) > 0);
        Assert.Equal("application/problem+json", refused.Content.Headers.ContentType?.MediaType);
        Assert.Contains("sign-in attempts", await refused.Content.ReadAsStringAsync());
        // Pages are not limited.
        Assert.Equal(HttpStatusCode.OK, (await client.GetAsync("/signin")).StatusCode);
    }

    [Fact]
    public async Task Api_requests_are_limited_per_key_so_one_sender_does_not_block_another()
    {
        await using var app = WithLimits(signIns: 100, apiRequests: 2);
        var client = app.CreateClient();
        async Task<HttpStatusCode> Send(string key)
        {
            using var request = new HttpRequestMessage(HttpMethod.Post, "/api/claims")
            {
                Content = new StringContent("claim_number\n", Encoding.UTF8, "text/csv"),
                Headers = { { "X-Api-Key", key } },
            };
            return (await client.SendAsync(request)).StatusCode;
        }
        Assert.NotEqual(HttpStatusCode.TooManyRequests, await Send("noisy-sender"));
        Assert.NotEqual(HttpStatusCode.TooManyRequests, await Send("noisy-sender"));
        Assert.Equal(HttpStatusCode.TooManyRequests, await Send("noisy-sender"));
        Assert.NotEqual(HttpStatusCode.TooManyRequests, await Send("quiet-sender"));
    }
}
