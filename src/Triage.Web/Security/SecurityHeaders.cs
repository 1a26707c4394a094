namespace Triage.Web.Security;

/// <summary>
/// Headers every response carries. The content security policy allows only this site's own scripts
/// (Blazor and MudBlazor load as files; there is no inline script), inline styles (MudBlazor sets
/// style attributes and a theme style element), images and fonts from the site or data URLs, and the
/// circuit's WebSocket back to the same origin. The app may not be framed by any page.
/// </summary>
public static class SecurityHeaders
{
    public const string ContentSecurityPolicy =
        "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data:; font-src 'self' data:; "
        + "connect-src 'self'; object-src 'none'; base-uri 'self'; form-action 'self'; frame-ancestors 'none'";

    public static IApplicationBuilder UseSecurityHeaders(this IApplicationBuilder app) => app.Use(async (http, next) =>
    {
        var h = http.Response.Headers;
        h.ContentSecurityPolicy = ContentSecurityPolicy;
        h.XFrameOptions = "DENY";
        h.XContentTypeOptions = "nosniff";
        h["Referrer-Policy"] = "same-origin";
        h["Permissions-Policy"] = "camera=(), microphone=(), geolocation=(), payment=()";
        h["Cross-Origin-Opener-Policy"] = "same-origin";
        await next();
    });
}
