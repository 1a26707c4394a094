using System.Text.Json;
using Microsoft.AspNetCore.Diagnostics.HealthChecks;
using Microsoft.Extensions.Diagnostics.HealthChecks;
using Triage.Cases;

namespace Triage.Web.Operations;

/// <summary>
/// Probes for a load balancer or an orchestrator: <c>/health/live</c> answers while the process runs,
/// <c>/health/ready</c> (and <c>/health</c>) only while this instance can do its work (the store is reachable
/// and migrated, the serving model is loaded, and with PostgreSQL it hears the other instances). Anonymous and
/// never rate-limited; the body names each check's status and nothing more (details go to the log).
/// </summary>
public static class HealthEndpoints
{
    public const string Live = "/health/live";
    public const string Ready = "/health/ready";
    public const string Default = "/health";

    public static WebApplication MapHealthEndpoints(this WebApplication app)
    {
        var ready = new HealthCheckOptions { Predicate = r => r.Tags.Contains(CasesSetup.ReadyTag), ResponseWriter = WriteAsync };
        Probe(app.MapHealthChecks(Live, new HealthCheckOptions { Predicate = _ => false, ResponseWriter = WriteAsync }));
        Probe(app.MapHealthChecks(Ready, ready));
        Probe(app.MapHealthChecks(Default, ready));
        return app;
    }

    // Probes only read: GET and HEAD, so no form post reaches them without the antiforgery check.
    private static void Probe(IEndpointConventionBuilder probe) =>
        probe.AllowAnonymous().DisableRateLimiting().WithMetadata(new HttpMethodMetadata(["GET", "HEAD"]));

    private static Task WriteAsync(HttpContext http, HealthReport report)
    {
        http.Response.ContentType = "application/json; charset=utf-8";
        var body = new
        {
            status = report.Status.ToString(),
            checks = report.Entries.ToDictionary(e => e.Key, e => e.Value.Status.ToString()),
        };
        return http.Response.WriteAsync(JsonSerializer.Serialize(body));
    }
}
