using System.ComponentModel.DataAnnotations;

namespace Triage.Web.Security;

/// <summary>Request limits (each counts per minute in a fixed window) and account lockout after failed sign-ins.</summary>
public sealed class SecurityOptions
{
    public const string Section = "Security";

    /// <summary>Sign-in posts per client address. Account lockout guards each account on top.</summary>
    [Range(1, 10_000)] public int SignInAttemptsPerMinute { get; set; } = 30;

    /// <summary>Requests to /api per API key (or per client address when no key is sent).</summary>
    [Range(1, 1_000_000)] public int ApiRequestsPerMinute { get; set; } = 600;

    /// <summary>Failed passwords in a row that lock an account (Identity's MaxFailedAccessAttempts).</summary>
    [Range(1, 100)] public int LockoutFailures { get; set; } = 5;

    /// <summary>How long a locked account stays locked (Identity's DefaultLockoutTimeSpan).</summary>
    [Range(1, 24 * 60)] public int LockoutMinutes { get; set; } = 15;
}
