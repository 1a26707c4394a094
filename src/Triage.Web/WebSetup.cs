using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.DataProtection;
using Microsoft.AspNetCore.DataProtection.KeyManagement;
using Microsoft.AspNetCore.DataProtection.Repositories;
using Microsoft.AspNetCore.Identity;
using MudBlazor.Services;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Web.Account;
using Triage.Web.Components;
using Triage.Web.Export;
using Triage.Web.Insights;
using Triage.Web.Reports;
using Triage.Web.Intake;
using Triage.Web.Operations;
using Triage.Web.Security;

namespace Triage.Web;

public static class WebSetup
{
    /// <summary>The data folder's subfolder for the Data Protection key ring.</summary>
    public const string KeysFolder = "keys";

    /// <summary>Blazor with MudBlazor, cookie sign-in over the store's Identity users, and sign-in required everywhere.</summary>
    public static IHostApplicationBuilder AddTriageWeb(this IHostApplicationBuilder b)
    {
        var s = b.Services;
        s.AddRazorComponents().AddInteractiveServerComponents();
        s.AddMudServices();
        s.AddCascadingAuthenticationState();
        s.AddAuthentication(IdentityConstants.ApplicationScheme).AddIdentityCookies();
        s.ConfigureApplicationCookie(o =>
        {
            o.LoginPath = AccountEndpoints.SignInPage;
            o.AccessDeniedPath = AccountEndpoints.SignInPage;
            o.SlidingExpiration = true;
            o.ExpireTimeSpan = TimeSpan.FromHours(10);
            // Script cannot read it; other sites' links still arrive signed in (Lax), their posts do not.
            // Secure follows the request, so the cookie is Secure as soon as the app is served over HTTPS.
            o.Cookie.HttpOnly = true;
            o.Cookie.SameSite = SameSiteMode.Lax;
            o.Cookie.SecurePolicy = CookieSecurePolicy.SameAsRequest;
        });
        s.AddRequestLimits();
        // Sign-in cookies and antiforgery tokens are sealed with these keys: kept in the (shared) data folder, every
        // instance can read what another issued, so a user whose instance goes away stays signed in on the next one.
        s.AddDataProtection().SetApplicationName("Triage");
        s.AddOptions<KeyManagementOptions>().Configure<TriagePaths, ILoggerFactory>((o, paths, logs) =>
            o.XmlRepository = new FileSystemXmlRepository(new DirectoryInfo(Path.Combine(paths.DataFolder, KeysFolder)), logs));
        // Our own X-Frame-Options (with the CSP's frame-ancestors) covers every response, not only forms.
        s.AddAntiforgery(o => o.SuppressXFrameOptionsHeader = true);
        new IdentityBuilder(typeof(TriageUser), typeof(IdentityRole), s)
            .AddSignInManager()
            .AddClaimsPrincipalFactory<TriageClaimsFactory>();
        s.AddAuthorizationBuilder()
            .SetFallbackPolicy(new AuthorizationPolicyBuilder().RequireAuthenticatedUser().Build());
        b.AddTriageTelemetry();
        return b;
    }

    public static WebApplication MapTriageWeb(this WebApplication app)
    {
        if (!app.Environment.IsDevelopment()) app.UseExceptionHandler("/error", createScopeForErrors: true);
        // Headers and limits first, so they also cover the sign-in redirects that authorization answers with.
        app.UseSecurityHeaders();
        app.UseRateLimiter();
        app.UseAuthentication();
        app.UseAuthorization();
        app.UseAntiforgery();
        app.MapStaticAssets().AllowAnonymous();
        app.MapHealthEndpoints();
        app.MapAccountEndpoints();
        app.MapReportEndpoints();
        app.MapIntakeEndpoints();
        app.MapInsightsEndpoints();
        app.MapExportEndpoints();
        // Our policy already says frame-ancestors 'none'; Blazor's own second policy header would only repeat it.
        app.MapRazorComponents<App>().AddInteractiveServerRenderMode(o => o.ContentSecurityFrameAncestorsPolicy = null);
        return app;
    }
}
