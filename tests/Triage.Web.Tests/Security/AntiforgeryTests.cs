using System.Net;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Tests.Support;
using Triage.Web.Intake;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Security;

/// <summary>
/// Every endpoint that takes a form post from a signed-in browser refuses one without a valid antiforgery
/// token. Exempt by design: the claims API (its credential is the API key header, never a cookie) and the
/// Blazor circuit's SignalR transport (not a form; a circuit starts only from the data-protected component
/// descriptors of a page the same user loaded).
/// </summary>
public sealed class AntiforgeryTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    private static readonly string[] Exempt = [IntakeEndpoints.Route, "/_blazor", "/_blazor/negotiate", "/_blazor/disconnect/", "/_blazor/initializers/"];

    /// <summary>Every route that takes a POST (an endpoint without method metadata takes any method), less the exempt ones.</summary>
    private List<string> FormPostRoutes()
    {
        _ = factory.Services;
        var posts = factory.Services.GetServices<EndpointDataSource>().SelectMany(d => d.Endpoints).OfType<RouteEndpoint>()
            .Where(e => e.Metadata.GetMetadata<HttpMethodMetadata>() is not { } m || m.HttpMethods.Contains("POST"))
            .Select(e => e.RoutePattern.RawText!).Distinct().ToList();
        Assert.All(Exempt, r => Assert.Contains(r, posts));
        return [.. posts.Where(r => !Exempt.Contains(r))];
    }

    [Fact]
    public async Task Every_form_post_without_a_token_is_refused_and_the_same_post_with_one_is_not()
    {
        var routes = FormPostRoutes();
        Assert.Contains("/account/signout", routes);
        Assert.Contains("/team", routes);
        // Olu is analyst and admin, so every page lets him in and only the token decides.
        var client = SignInClient.Anonymous(factory);
        Assert.Equal("/", (await SignInClient.PostAsync(client, "olu.berg", TinySeed.Password)).Headers.Location!.OriginalString);
        int caseId;
        using (var scope = factory.Services.CreateScope())
            caseId = scope.ServiceProvider.GetRequiredService<Triage.Cases.Store.TriageDbContext>().Cases.Select(c => c.Id).First();
        var failures = new List<string>();
        foreach (var route in routes.Where(r => r != "/account/signout").Append("/account/signout"))
        {
            var path = route.Replace("{Id:int}", caseId.ToString());
            var form = route == "/account/signin"
                ? new Dictionary<string, string> { ["UserName"] = "olu.berg", ["Password"] = TinySeed.Password }
                : new Dictionary<string, string> { ["_handler"] = "any" };
            var without = await client.PostAsync(path, new FormUrlEncodedContent(form));
            var body = await without.Content.ReadAsStringAsync();
            if (without.StatusCode != HttpStatusCode.BadRequest || !SaysAntiforgery(body))
                failures.Add($"POST {path} without a token: {(int)without.StatusCode}, not 400 for the token");
            form["__RequestVerificationToken"] = await SignInClient.TokenAsync(client);
            var with = await client.PostAsync(path, new FormUrlEncodedContent(form));
            var withBody = await with.Content.ReadAsStringAsync();
            // With the token the request gets past the check: whatever it answers, it is not the antiforgery refusal.
            if (with.StatusCode == HttpStatusCode.BadRequest && SaysAntiforgery(withBody))
                failures.Add($"POST {path} with a token was refused for the token");
        }
        Assert.True(failures.Count == 0, string.Join('\n', failures));
    }

    private static bool SaysAntiforgery(string body) =>
        body.Contains("antiforgery", StringComparison.OrdinalIgnoreCase) || body.Contains("anti-forgery", StringComparison.OrdinalIgnoreCase);
}
