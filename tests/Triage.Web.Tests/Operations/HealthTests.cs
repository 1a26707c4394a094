using System.Net;
using System.Text.Json;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Options;
using OpenTelemetry.Metrics;
using OpenTelemetry.Trace;
using Triage.Web.Operations;
using Triage.Web.Security;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Operations;

public sealed class HealthTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    private WebApplicationFactory<Program> With(Dictionary<string, string?> settings) =>
        factory.WithWebHostBuilder(b => b.ConfigureAppConfiguration(c => c.AddInMemoryCollection(settings)));

    private static async Task<JsonElement> BodyAsync(HttpResponseMessage response) =>
        JsonDocument.Parse(await response.Content.ReadAsStringAsync()).RootElement;

    [Fact]
    public async Task Live_answers_without_sign_in_and_runs_no_checks()
    {
        var response = await SignInClient.Anonymous(factory).GetAsync(HealthEndpoints.Live);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        var body = await BodyAsync(response);
        Assert.Equal("Healthy", body.GetProperty("status").GetString());
        Assert.Empty(body.GetProperty("checks").EnumerateObject());
    }

    [Theory]
    [InlineData(HealthEndpoints.Ready)]
    [InlineData(HealthEndpoints.Default)]
    public async Task Ready_checks_the_store_and_the_serving_model_without_sign_in(string path)
    {
        var response = await SignInClient.Anonymous(factory).GetAsync(path);
        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal("application/json", response.Content.Headers.ContentType?.MediaType);
        var body = await BodyAsync(response);
        Assert.Equal("Healthy", body.GetProperty("status").GetString());
        var checks = body.GetProperty("checks").EnumerateObject().ToDictionary(p => p.Name, p => p.Value.GetString());
        // SQLite: no instance link to check.
        Assert.Equal(new Dictionary<string, string?> { ["store"] = "Healthy", ["model"] = "Healthy" }, checks);
        // A probe's answer must not be cached by a proxy in between.
        Assert.Contains("no-store", response.Headers.CacheControl?.ToString());
    }

    [Theory]
    [InlineData(HealthEndpoints.Live)]
    [InlineData(HealthEndpoints.Ready)]
    public async Task Probes_carry_the_security_headers_and_are_never_rate_limited(string path)
    {
        await using var app = With(new() { ["Security:SignInAttemptsPerMinute"] = "1", ["Security:ApiRequestsPerMinute"] = "1" });
        var client = SignInClient.Anonymous(app);
        for (var i = 0; i < 10; i++)
        {
            var response = await client.GetAsync(path);
            Assert.Equal(HttpStatusCode.OK, response.StatusCode);
            Assert.Equal(SecurityHeaders.ContentSecurityPolicy, Assert.Single(response.Headers.GetValues("Content-Security-Policy")));
            Assert.Equal("DENY", Assert.Single(response.Headers.GetValues("X-Frame-Options")));
            Assert.Equal("nosniff", Assert.Single(response.Headers.GetValues("X-Content-Type-Options")));
        }
    }

    [Fact]
    public async Task The_key_ring_for_cookies_lives_in_the_data_folder_which_instances_share()
    {
        var client = SignInClient.Anonymous(factory);
        await SignInClient.PostAsync(client, "ines.varga", Triage.Cases.Tests.Support.TinySeed.Password);
        var keys = Path.Combine(factory.Folder, "data", WebSetup.KeysFolder);
        Assert.NotEmpty(Directory.GetFiles(keys, "key-*.xml"));
    }

    [Fact]
    public void OpenTelemetry_is_off_until_an_endpoint_is_configured()
    {
        Assert.Null(factory.Services.GetService<MeterProvider>());
        Assert.Null(factory.Services.GetService<TracerProvider>());
        // UseSetting, not app configuration: the choice is made while services are registered, which sees host settings
        // (as it sees environment variables and appsettings.json in a real start).
        using var exporting = factory.WithWebHostBuilder(b => b.UseSetting("Telemetry:OtlpEndpoint", "http://127.0.0.1:4317"));
        Assert.NotNull(exporting.Services.GetService<MeterProvider>());
        Assert.NotNull(exporting.Services.GetService<TracerProvider>());
        Assert.Equal("http://127.0.0.1:4317", exporting.Services.GetRequiredService<IOptions<TelemetryOptions>>().Value.OtlpEndpoint);
    }

    [Fact]
    public void A_malformed_endpoint_stops_the_start_naming_the_key()
    {
        using var bad = With(new() { ["Telemetry:OtlpEndpoint"] = "collector port 4317" });
        var e = Assert.ThrowsAny<Exception>(() => bad.Services);
        Assert.Contains("Telemetry:OtlpEndpoint", e.ToString());
    }
}
