using System.Net;
using System.Text;
using Microsoft.AspNetCore.Http;
using Microsoft.AspNetCore.Routing;
using Microsoft.AspNetCore.StaticAssets;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Accounts;
using Triage.Cases.ApiKeys;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.Tests.Support;
using Triage.Web.Intake;
using Triage.Web.Tests.Support;
using RouteAttribute = Microsoft.AspNetCore.Components.RouteAttribute;

namespace Triage.Web.Tests.Security;

/// <summary>
/// Every page and every HTTP endpoint of the running app, requested by an anonymous visitor and by one
/// account per role, against the table below. A route the app has that the table lacks fails the test
/// (new routes must be classified), and so does a row naming a route the app no longer has.
/// </summary>
public sealed class RoleMatrixTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    // deny = redirect to sign-in (challenge or forbid), 401, 403, or a page showing the service's "may not" refusal.
    // Requests: {unassigned}, {own} (assigned to the investigator column), {colleague} (assigned to another investigator);
    // "+key" sends a valid intake API key. Rows run top to bottom: signing out, then in again, come last.
    private const string Table = """
        method | route                           | request                         | anonymous | investigator | team lead | analyst | manager | admin
        GET    | /                               | /                               | deny      | allow        | allow     | allow   | allow   | allow
        GET    | /queue                          | /queue                          | deny      | allow        | allow     | allow   | allow   | allow
        GET    | /signin                         | /signin                         | allow     | allow        | allow     | allow   | allow   | allow
        GET    | /error                          | /error                          | allow     | allow        | allow     | allow   | allow   | allow
        GET    | /health                         | /health                         | allow     | allow        | allow     | allow   | allow   | allow
        GET    | /health/ready                   | /health/ready                   | allow     | allow        | allow     | allow   | allow   | allow
        GET    | /health/live                    | /health/live                    | allow     | allow        | allow     | allow   | allow   | allow
        GET    | /cases/{Id:int}                 | /cases/{unassigned}             | deny      | allow        | allow     | allow   | allow   | allow
        GET    | /cases/{Id:int}                 | /cases/{own}                    | deny      | allow        | allow     | allow   | allow   | allow
        GET    | /cases/{Id:int}                 | /cases/{colleague}              | deny      | deny         | allow     | allow   | allow   | allow
        GET    | /cases/{id:int}/report.pdf      | /cases/{unassigned}/report.pdf  | deny      | allow        | allow     | allow   | allow   | allow
        GET    | /cases/{id:int}/report.pdf      | /cases/{own}/report.pdf         | deny      | allow        | allow     | allow   | allow   | allow
        GET    | /cases/{id:int}/report.pdf      | /cases/{colleague}/report.pdf   | deny      | deny         | allow     | allow   | allow   | allow
        GET    | /team                           | /team                           | deny      | deny         | allow     | deny    | allow   | allow
        GET    | /models                         | /models                         | deny      | deny         | deny      | allow   | allow   | allow
        GET    | /models/drift                   | /models/drift                   | deny      | deny         | deny      | allow   | allow   | allow
        GET    | /intake                         | /intake                         | deny      | deny         | deny      | allow   | deny    | allow
        GET    | /admin/api-keys                 | /admin/api-keys                 | deny      | deny         | deny      | deny    | deny    | allow
        GET    | /insights                       | /insights                       | deny      | deny         | deny      | deny    | allow   | allow
        GET    | /insights/{table}.csv           | /insights/drivers.csv           | deny      | deny         | deny      | deny    | allow   | allow
        GET    | /export                         | /export                         | deny      | deny         | deny      | allow   | deny    | allow
        GET    | /export/outcomes.{format}       | /export/outcomes.csv            | deny      | deny         | deny      | allow   | deny    | allow
        POST   | /api/claims                     | /api/claims                     | deny      | deny         | deny      | deny    | deny    | deny
        POST   | /api/claims                     | /api/claims +key                | allow     | allow        | allow     | allow   | allow   | allow
        GET    | (every static asset)            | (each)                          | allow     | allow        | allow     | allow   | allow   | allow
        GET    | {**path:file}                   | /_framework/blazor.web.js       | allow     | allow        | allow     | allow   | allow   | allow
        GET    | /_framework/opaque-redirect     | /_framework/opaque-redirect     | deny      | allow        | allow     | allow   | allow   | allow
        POST   | /_blazor/negotiate              | /_blazor/negotiate?negotiateVersion=1 | deny | allow      | allow     | allow   | allow   | allow
        GET    | /_blazor                        | /_blazor                        | deny      | allow        | allow     | allow   | allow   | allow
        GET    | /_blazor/initializers/          | /_blazor/initializers/          | deny      | allow        | allow     | allow   | allow   | allow
        POST   | /_blazor/disconnect/            | /_blazor/disconnect/            | deny      | allow        | allow     | allow   | allow   | allow
        POST   | /account/signout                | /account/signout                | deny      | allow        | allow     | allow   | allow   | allow
        POST   | /account/signin                 | /account/signin                 | allow     | allow        | allow     | allow   | allow   | allow
        """;

    private const string StaticAssets = "(every static asset)";

    /// <summary>The columns after "request": who asks. Investigator is a demo account; the others hold one role each.</summary>
    private static readonly (string Column, string? UserName, string? Role)[] Askers =
    [
        ("anonymous", null, null),
        ("investigator", "ines.varga", null),
        ("team lead", "matrix.lead", Roles.TeamLead),
        ("analyst", "matrix.analyst", Roles.Analyst),
        ("manager", "matrix.manager", Roles.Manager),
        ("admin", "matrix.admin", Roles.Admin),
    ];

    private sealed record Row(string Method, string Route, string Request, bool[] Allowed);

    private static List<Row> Rows()
    {
        var lines = Table.Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        var header = lines[0].Split('|', StringSplitOptions.TrimEntries);
        Assert.Equal(["method", "route", "request", .. Askers.Select(a => a.Column)], header);
        return [.. lines.Skip(1).Select(l => l.Split('|', StringSplitOptions.TrimEntries)).Select(c => new Row(c[0], c[1], c[2],
            [.. c[3..].Select(v => v switch { "allow" => true, "deny" => false, _ => throw new FormatException($"'{v}' in row {c[1]}: allow or deny") })]))];
    }

    private sealed record AppEndpoint(string Route, IReadOnlyList<string>? Methods, bool IsStaticAsset);

    private List<AppEndpoint> AppEndpoints()
    {
        _ = factory.Services; // starts the app
        return [.. factory.Services.GetServices<EndpointDataSource>().SelectMany(d => d.Endpoints).OfType<RouteEndpoint>()
            .Select(e => new AppEndpoint(e.RoutePattern.RawText!, e.Metadata.GetMetadata<HttpMethodMetadata>()?.HttpMethods.ToList(),
                e.Metadata.GetMetadata<StaticAssetDescriptor>() is not null))];
    }

    private static bool Matches(Row row, AppEndpoint e) =>
        row.Route == StaticAssets ? e.IsStaticAsset
            : !e.IsStaticAsset && row.Route == e.Route && (e.Methods is null || e.Methods.Contains(row.Method));

    [Fact]
    public void Every_route_of_the_app_is_in_the_table_and_every_row_names_a_real_route()
    {
        var rows = Rows();
        var endpoints = AppEndpoints();
        var unclassified = endpoints.Where(e => !rows.Any(r => Matches(r, e))).Select(e => $"{string.Join(',', e.Methods ?? ["any"])} {e.Route}").ToList();
        Assert.True(unclassified.Count == 0, "Routes missing from the role table (add a row saying who may use them): " + string.Join("; ", unclassified));
        var stale = rows.Where(r => !endpoints.Any(e => Matches(r, e))).Select(r => $"{r.Method} {r.Route}").ToList();
        Assert.True(stale.Count == 0, "Rows for routes the app no longer has: " + string.Join("; ", stale));

        // The @page routes found by reflection are exactly the component endpoints, so no page hides outside the endpoint list.
        var pages = typeof(Program).Assembly.GetTypes()
            .SelectMany(t => t.GetCustomAttributes(typeof(RouteAttribute), inherit: false).Cast<RouteAttribute>()).Select(a => a.Template).ToList();
        Assert.NotEmpty(pages);
        Assert.All(pages, p => Assert.Contains(rows, r => r.Route == p && r.Method == "GET"));
        Assert.All(pages, p => Assert.Contains(endpoints, e => e.Route == p));
    }

    [Fact]
    public async Task Each_role_and_an_anonymous_visitor_get_exactly_what_the_table_says()
    {
        var ids = await PrepareAsync();
        var rows = Rows();
        var assets = AppEndpoints().Where(e => e.IsStaticAsset).Select(e => "/" + e.Route.TrimStart('/')).Distinct().ToList();
        Assert.NotEmpty(assets);
        var wrong = new List<string>();
        for (var col = 0; col < Askers.Length; col++)
        {
            var (column, userName, _) = Askers[col];
            var client = SignInClient.Anonymous(factory);
            if (userName is not null)
                Assert.Equal("/", (await SignInClient.PostAsync(client, userName, TinySeed.Password)).Headers.Location?.OriginalString);
            foreach (var row in rows)
            {
                var requests = row.Route == StaticAssets ? assets : [Fill(row.Request, ids)];
                foreach (var request in requests)
                {
                    var (allowed, said) = await AskAsync(client, row.Method, request, userName, ids.Key);
                    if (allowed != row.Allowed[col])
                        wrong.Add($"{column}: {row.Method} {request} expected {(row.Allowed[col] ? "allow" : "deny")}, got {said}");
                }
            }
        }
        Assert.True(wrong.Count == 0, "Cells that do not match the table:\n" + string.Join('\n', wrong));
    }

    private sealed record Ids(int Unassigned, int Own, int Colleague, string Key);

    private static string Fill(string request, Ids ids) => request
        .Replace("{unassigned}", ids.Unassigned.ToString()).Replace("{own}", ids.Own.ToString()).Replace("{colleague}", ids.Colleague.ToString());

    /// <summary>One account per single role, a case for Ines, one for Tomas, one unassigned, and an intake key.</summary>
    private async Task<Ids> PrepareAsync()
    {
        await using var scope = factory.Services.CreateAsyncScope();
        var sp = scope.ServiceProvider;
        var accounts = sp.GetRequiredService<UserAccounts>();
        foreach (var (_, userName, role) in Askers.Where(a => a.Role is not null))
            await accounts.AddAsync(Actor.System, new NewAccount(userName!, userName!, $"{userName}@example.test", [role!], [], 0), TinySeed.Password);
        var db = sp.GetRequiredService<Triage.Cases.Store.TriageDbContext>();
        Actor Investigator(string name) => new(db.Users.Single(u => u.UserName == name).Id, name, new HashSet<string> { Roles.Investigator });
        var own = await sp.GetRequiredService<TakeNextService>().TakeNextAsync(Investigator("ines.varga"))
            ?? throw new InvalidOperationException("The tiny seed has no open motor/home case for Ines to take.");
        var colleague = await sp.GetRequiredService<TakeNextService>().TakeNextAsync(Investigator("tomas.reed"))
            ?? throw new InvalidOperationException("The tiny seed has no open travel case for Tomas to take.");
        var unassigned = db.Cases.Where(c => c.IsOpen && c.AssigneeId == null).Select(c => c.Id).First();
        var key = await sp.GetRequiredService<ApiKeyService>().CreateAsync("role matrix", Actor.System);
        return new Ids(unassigned, own.CaseId, colleague.CaseId, key.Secret);
    }

    private static async Task<(bool? Allowed, string Said)> AskAsync(HttpClient client, string method, string request, string? userName, string key)
    {
        var path = request.Replace(" +key", "");
        using var message = new HttpRequestMessage(new HttpMethod(method), path);
        if (request.EndsWith(" +key", StringComparison.Ordinal)) message.Headers.Add(IntakeEndpoints.KeyHeader, key);
        if (path == "/api/claims") message.Content = new StringContent("claim_number\n", Encoding.UTF8, "text/csv");
        else if (path == "/account/signin" || path == "/account/signout")
        {
            var form = new Dictionary<string, string> { ["__RequestVerificationToken"] = await SignInClient.TokenAsync(client) };
            // A real sign-in (the visitor's own account, or Ines for the anonymous visitor) must pass, so only the door is tested.
            if (path == "/account/signin") { form["UserName"] = userName ?? "ines.varga"; form["Password"] = TinySeed.Password; form["ReturnUrl"] = "/"; }
            message.Content = new FormUrlEncodedContent(form);
        }
        using var response = await client.SendAsync(message, HttpCompletionOption.ResponseHeadersRead);
        var status = (int)response.StatusCode;
        var location = response.Headers.Location;
        var said = $"{status}{(location is null ? "" : " → " + location.OriginalString)}";
        if (status is 401 or 403) return (false, said);
        if (location is not null && IsSignInChallenge(location)) return (false, said);
        // Neither allowed nor refused: a broken cell whatever the table says.
        if (status == 404 || status >= 500) return (null, said);
        if (status == 200 && userName is not null && IsHtml(response))
        {
            var body = await response.Content.ReadAsStringAsync();
            if (body.Contains($"{userName} may not ", StringComparison.Ordinal)) return (false, said + " with the service's refusal");
        }
        return (true, said);
    }

    private static bool IsHtml(HttpResponseMessage r) => r.Content.Headers.ContentType?.MediaType == "text/html";

    /// <summary>The cookie handler's challenge or forbid: to the sign-in page with the ReturnUrl it adds.</summary>
    private static bool IsSignInChallenge(Uri location)
    {
        var absolute = location.IsAbsoluteUri ? location : new Uri(new Uri("http://localhost"), location);
        return absolute.AbsolutePath == "/signin" && absolute.Query.Contains("ReturnUrl=", StringComparison.Ordinal);
    }
}
