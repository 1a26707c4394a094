using System.ComponentModel.DataAnnotations;

namespace Triage.Web.Security;

/// <summary>Request limits; each counts per minute in a fixed window.</summary>
public sealed class SecurityOptions
{
    public const string Section = "Security";

    /// <summary>Sign-in posts per client address. Account lockout (5 failures) guards each account on top.</summary>
    [Range(1, 10_000)] public int SignInAttemptsPerMinute { get; set; } = 30;

    /// <summary>Requests to /api per API key (or per client address when no key is sent).</summary>
    [Range(1, 1_000_000)] public int ApiRequestsPerMinute { get; set; } = 600;
}
