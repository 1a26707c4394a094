using Microsoft.AspNetCore.Authorization;
using Microsoft.AspNetCore.Identity;
using MudBlazor.Services;
using Triage.Cases.Domain;
using Triage.Web.Account;
using Triage.Web.Components;
using Triage.Web.Insights;
using Triage.Web.Reports;
using Triage.Web.Intake;

namespace Triage.Web;

public static class WebSetup
{
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
        });
        new IdentityBuilder(typeof(TriageUser), typeof(IdentityRole), s)
            .AddSignInManager()
            .AddClaimsPrincipalFactory<TriageClaimsFactory>();
        s.AddAuthorizationBuilder()
            .SetFallbackPolicy(new AuthorizationPolicyBuilder().RequireAuthenticatedUser().Build());
        return b;
    }

    public static WebApplication MapTriageWeb(this WebApplication app)
    {
        if (!app.Environment.IsDevelopment()) app.UseExceptionHandler("/error", createScopeForErrors: true);
        app.UseAntiforgery();
        app.MapStaticAssets().AllowAnonymous();
        app.MapAccountEndpoints();
        app.MapReportEndpoints();
        app.MapIntakeEndpoints();
        app.MapInsightsEndpoints();
        app.MapRazorComponents<App>().AddInteractiveServerRenderMode();
        return app;
    }
}
