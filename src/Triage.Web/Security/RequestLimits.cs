using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Threading.RateLimiting;
using Microsoft.AspNetCore.Identity;
using Microsoft.AspNetCore.RateLimiting;
using Microsoft.Extensions.Options;
using Triage.Web.Account;
using Triage.Web.Intake;

namespace Triage.Web.Security;

/// <summary>
/// Account lockout, and one limiter for the two doors a stranger can knock on: the sign-in post (per client address) and the
/// API (per key, so one noisy sender cannot starve the others). Pages behind sign-in are not limited.
/// </summary>
public static class RequestLimits
{
    public static IServiceCollection AddRequestLimits(this IServiceCollection s)
    {
        s.AddOptions<SecurityOptions>().BindConfiguration(SecurityOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        // Lockout counts failures per account (the sign-in post passes lockoutOnFailure); these settings win over Identity's defaults.
        s.AddOptions<IdentityOptions>().Configure<IOptions<SecurityOptions>>((identity, security) =>
        {
            identity.Lockout.AllowedForNewUsers = true;
            identity.Lockout.MaxFailedAccessAttempts = security.Value.LockoutFailures;
            identity.Lockout.DefaultLockoutTimeSpan = TimeSpan.FromMinutes(security.Value.LockoutMinutes);
        });
        s.AddRateLimiter(o =>
        {
            o.GlobalLimiter = PartitionedRateLimiter.Create<HttpContext, string>(http =>
            {
                var limits = http.RequestServices.GetRequiredService<IOptions<SecurityOptions>>().Value;
                var path = http.Request.Path;
                if (HttpMethods.IsPost(http.Request.Method) && path.Equals(AccountEndpoints.SignInPost, StringComparison.OrdinalIgnoreCase))
                    return Window("signin:" + Client(http), limits.SignInAttemptsPerMinute);
                if (path.StartsWithSegments("/api", StringComparison.OrdinalIgnoreCase))
                    return Window("api:" + (KeyOf(http) ?? Client(http)), limits.ApiRequestsPerMinute);
                return RateLimitPartition.GetNoLimiter("none");
            });
            o.OnRejected = async (context, ct) =>
            {
                var http = context.HttpContext;
                var retry = context.Lease.TryGetMetadata(MetadataName.RetryAfter, out var after) ? (int)Math.Ceiling(after.TotalSeconds) : 60;
                http.Response.StatusCode = StatusCodes.Status429TooManyRequests;
                http.Response.Headers.RetryAfter = retry.ToString(CultureInfo.InvariantCulture);
                var what = http.Request.Path.StartsWithSegments("/api") ? "requests with this API key" : "sign-in attempts from this address";
                await Results.Problem(statusCode: StatusCodes.Status429TooManyRequests, title: "Too many requests",
                    detail: $"Too many {what} in the last minute; try again in {retry} s.").ExecuteAsync(http);
            };
        });
        return s;
    }

    private static RateLimitPartition<string> Window(string key, int perMinute) =>
        RateLimitPartition.GetFixedWindowLimiter(key, _ => new FixedWindowRateLimiterOptions
        {
            PermitLimit = perMinute,
            Window = TimeSpan.FromMinutes(1),
            QueueLimit = 0,
        });

    private static string Client(HttpContext http) => http.Connection.RemoteIpAddress?.ToString() ?? "unknown";

    /// <summary>A hash of the key as sent, so the partition table never holds a secret.</summary>
    private static string? KeyOf(HttpContext http)
    {
        var sent = http.Request.Headers[IntakeEndpoints.KeyHeader].FirstOrDefault()
            ?? http.Request.Headers.Authorization.FirstOrDefault();
        return string.IsNullOrWhiteSpace(sent) ? null : Convert.ToHexString(SHA256.HashData(Encoding.UTF8.GetBytes(sent)))[..32];
    }
}
