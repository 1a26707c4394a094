using System.Net;
using System.Net.Http.Headers;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Extensions.Configuration;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.ApiKeys;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Support;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Intake;

public sealed class ClaimsApiTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    private static readonly Actor Admin = new("id-admin", "test-admin", new HashSet<string> { Roles.Admin });

    private async Task<IssuedApiKey> NewKeyAsync(WebApplicationFactory<Program>? app = null)
    {
        await using var scope = (app ?? factory).Services.CreateAsyncScope();
        return await scope.ServiceProvider.GetRequiredService<ApiKeyService>().CreateAsync("claims system", Admin);
    }

    private static HttpRequestMessage Post(string body, string? key, string contentType = "text/csv", string query = "") =>
        new(HttpMethod.Post, "/api/claims" + query)
        {
            Content = new StringContent(body, Encoding.UTF8, contentType),
            Headers = { { "X-Api-Key", key is null ? [] : [key] } },
        };

    /// <summary>The members RFC 9457 §3.1 defines, and the media type of §6.1.</summary>
    private static async Task<JsonElement> ProblemAsync(HttpResponseMessage response, HttpStatusCode status)
    {
        Assert.Equal(status, response.StatusCode);
        Assert.Equal("application/problem+json", response.Content.Headers.ContentType?.MediaType);
        var problem = JsonDocument.Parse(await response.Content.ReadAsStringAsync()).RootElement;
        Assert.Equal((int)status, problem.GetProperty("status").GetInt32());
        Assert.StartsWith("urn:triage:problem:", problem.GetProperty("type").GetString());
        Assert.False(string.IsNullOrWhiteSpace(problem.GetProperty("title").GetString()));
        Assert.False(string.IsNullOrWhiteSpace(problem.GetProperty("detail").GetString()));
        return problem;
    }

    [Fact]
    public async Task A_key_is_required_and_unknown_or_revoked_keys_are_refused()
    {
        var client = factory.CreateClient();
        var csv = IntakeRows.Csv(IntakeRows.Many(1, "AUTH"));
        var missing = await client.SendAsync(Post(csv, null));
        Assert.Contains("X-Api-Key", (await ProblemAsync(missing, HttpStatusCode.Unauthorized)).GetProperty("detail").GetString());
        Assert.NotEmpty(missing.Headers.WwwAuthenticate);
        await ProblemAsync(await client.SendAsync(Post(csv, "trk_not-a-real-key")), HttpStatusCode.Unauthorized);

        var key = await NewKeyAsync();
        await using (var scope = factory.Services.CreateAsyncScope())
            await scope.ServiceProvider.GetRequiredService<ApiKeyService>().RevokeAsync(key.Key.Id.ToString(), Admin);
        var revoked = await client.SendAsync(Post(csv, key.Secret));
        Assert.Contains("revoked", (await ProblemAsync(revoked, HttpStatusCode.Unauthorized)).GetProperty("detail").GetString());
    }

    [Fact]
    public async Task Valid_claims_are_stored_once_and_a_resend_reports_duplicates()
    {
        var key = await NewKeyAsync();
        var client = factory.CreateClient();
        var csv = IntakeRows.Csv(IntakeRows.Many(12, "API"));
        var first = await client.SendAsync(Post(csv, key.Secret));
        Assert.Equal(HttpStatusCode.OK, first.StatusCode);
        var counts = await first.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal(12, counts.GetProperty("stored").GetInt32());
        Assert.Equal(counts.GetProperty("stored").GetInt32(), counts.GetProperty("queued").GetInt32() + counts.GetProperty("scoredOnly").GetInt32());

        var request = Post(csv, null);
        request.Headers.Authorization = new AuthenticationHeaderValue("Bearer", key.Secret);
        var again = await (await client.SendAsync(request)).Content.ReadFromJsonAsync<JsonElement>();
        Assert.Equal((0, 12), (again.GetProperty("stored").GetInt32(), again.GetProperty("duplicates").GetInt32()));

        var json = IntakeRows.Json(IntakeRows.Many(2, "APIJ"));
        var fromJson = await client.SendAsync(Post(json, key.Secret, "application/json"));
        Assert.Equal(HttpStatusCode.OK, fromJson.StatusCode);
    }

    [Fact]
    public async Task Bad_rows_give_a_problem_listing_row_column_value_and_what_is_wrong()
    {
        var key = await NewKeyAsync();
        var csv = IntakeRows.Edit(IntakeRows.Edit(IntakeRows.Csv(IntakeRows.Many(3, "BADAPI")), 2, "claimed_amount", "-3"), 3, "line", "boat");
        var response = await factory.CreateClient().SendAsync(Post(csv, key.Secret));

        var problem = await ProblemAsync(response, HttpStatusCode.UnprocessableEntity);
        Assert.Equal("urn:triage:problem:invalid-claims", problem.GetProperty("type").GetString());
        Assert.Equal(2, problem.GetProperty("errorCount").GetInt32());
        var errors = problem.GetProperty("errors").EnumerateArray().ToList();
        Assert.Equal((2, "claimed_amount", "-3"), (errors[0].GetProperty("row").GetInt32(), errors[0].GetProperty("column").GetString(), errors[0].GetProperty("value").GetString()));
        Assert.Contains("below", errors[0].GetProperty("problem").GetString());
        Assert.Equal((3, "line"), (errors[1].GetProperty("row").GetInt32(), errors[1].GetProperty("column").GetString()));
    }

    [Fact]
    public async Task Body_size_row_count_and_media_type_are_limited_with_clear_messages()
    {
        await using var small = factory.WithWebHostBuilder(b => b.ConfigureAppConfiguration(c => c.AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Intake:MaxBodyBytes"] = "4096",
            ["Intake:MaxRowsPerRequest"] = "3",
        })));
        var key = await NewKeyAsync(small);
        var client = small.CreateClient();
        var before = await ClaimCountAsync(small);

        var big = await client.SendAsync(Post(IntakeRows.Csv(IntakeRows.Many(40, "HUGE")), key.Secret));
        var tooBig = await ProblemAsync(big, HttpStatusCode.RequestEntityTooLarge);
        Assert.Contains("at most 4,096 bytes", tooBig.GetProperty("detail").GetString());
        // Sent without a length up front, the body is counted as it arrives and refused the same way.
        var chunked = Post(IntakeRows.Csv(IntakeRows.Many(40, "HUGE")), key.Secret);
        chunked.Headers.TransferEncodingChunked = true;
        chunked.Content = new StreamContent(new MemoryStream(Encoding.UTF8.GetBytes(IntakeRows.Csv(IntakeRows.Many(40, "HUGE")))))
            { Headers = { ContentType = new MediaTypeHeaderValue("text/csv") } };
        await ProblemAsync(await client.SendAsync(chunked), HttpStatusCode.RequestEntityTooLarge);

        var rows = await client.SendAsync(Post(IntakeRows.Csv(IntakeRows.Many(4, "ROWS")), key.Secret));
        var tooMany = await ProblemAsync(rows, HttpStatusCode.RequestEntityTooLarge);
        Assert.Equal("urn:triage:problem:too-many-rows", tooMany.GetProperty("type").GetString());
        Assert.Contains("more than 3 claims", tooMany.GetProperty("errors")[0].GetProperty("problem").GetString());

        await ProblemAsync(await client.SendAsync(Post("a,b", key.Secret, "application/xml")), HttpStatusCode.UnsupportedMediaType);
        await ProblemAsync(await client.SendAsync(Post("a,b", key.Secret, query: "?delimiter=ab")), HttpStatusCode.BadRequest);
        Assert.Equal(before, await ClaimCountAsync(small));
    }

    [Fact]
    public async Task A_semicolon_file_goes_in_with_the_delimiter_named()
    {
        var key = await NewKeyAsync();
        var csv = IntakeRows.Csv(IntakeRows.Many(3, "SEMI"), ';');
        var refused = await ProblemAsync(await factory.CreateClient().SendAsync(Post(csv, key.Secret)), HttpStatusCode.UnprocessableEntity);
        Assert.Contains("';' as delimiter", refused.GetProperty("errors")[0].GetProperty("problem").GetString());
        var taken = await factory.CreateClient().SendAsync(Post(csv, key.Secret, query: "?delimiter=%3B"));
        Assert.Equal(HttpStatusCode.OK, taken.StatusCode);
        Assert.Equal(3, (await taken.Content.ReadFromJsonAsync<JsonElement>()).GetProperty("stored").GetInt32());
    }

    private static async Task<int> ClaimCountAsync(WebApplicationFactory<Program> app)
    {
        await using var scope = app.Services.CreateAsyncScope();
        return await scope.ServiceProvider.GetRequiredService<Triage.Cases.Store.TriageDbContext>().Claims.CountAsync();
    }

    [Fact]
    public async Task The_upload_page_is_for_analysts_and_the_key_page_for_admins()
    {
        var analyst = SignInClient.Anonymous(factory);
        await SignInClient.PostAsync(analyst, "olu.berg", TinySeed.Password);
        var upload = await analyst.GetStringAsync("/intake");
        Assert.Contains("Import claims", upload);
        Assert.Contains("Choose a file", upload);
        Assert.Contains("API keys", await analyst.GetStringAsync("/admin/api-keys"));

        var investigator = SignInClient.Anonymous(factory);
        await SignInClient.PostAsync(investigator, "ines.varga", TinySeed.Password);
        Assert.Equal(HttpStatusCode.Redirect, (await investigator.GetAsync("/intake")).StatusCode);
        Assert.DoesNotContain("href=\"/intake\"", await investigator.GetStringAsync("/"));
    }
}
