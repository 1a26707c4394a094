using Microsoft.AspNetCore.Antiforgery;
using Microsoft.AspNetCore.Identity;
using Microsoft.AspNetCore.Mvc;
using Triage.Cases.Domain;

namespace Triage.Web.Account;

/// <summary>Form posts for signing in and out; antiforgery is checked on both (sign-in by form binding, sign-out by itself).</summary>
public static class AccountEndpoints
{
    public const string SignInPage = "/signin";
    public const string SignInPost = "/account/signin";

    public static void MapAccountEndpoints(this IEndpointRouteBuilder app)
    {
        var account = app.MapGroup("/account");
        account.MapPost("/signin", SignInAsync).AllowAnonymous();
        account.MapPost("/signout", async (HttpContext http, SignInManager<TriageUser> signIn) =>
        {
            // UseAntiforgery checks the token but minimal APIs refuse a bad one only while binding a form, and this
            // post binds none: it reads the verdict itself, so another site cannot sign people out.
            if (http.Features.Get<IAntiforgeryValidationFeature>() is not { IsValid: true })
                return Results.Problem("The sign-out form's antiforgery token is missing or invalid; sign out from the app's own menu.",
                    statusCode: StatusCodes.Status400BadRequest);
            await signIn.SignOutAsync();
            return Results.LocalRedirect(SignInPage);
        }).WithMetadata(new RequireAntiforgeryTokenAttribute());
    }

    private static async Task<IResult> SignInAsync([FromForm] SignInForm form, SignInManager<TriageUser> signIn)
    {
        var back = Uri.EscapeDataString(form.ReturnUrl ?? "/");
        if (string.IsNullOrWhiteSpace(form.UserName) || string.IsNullOrEmpty(form.Password))
            return Results.LocalRedirect($"{SignInPage}?error=missing&returnUrl={back}");
        var result = await signIn.PasswordSignInAsync(form.UserName.Trim(), form.Password, isPersistent: false, lockoutOnFailure: true);
        if (result.Succeeded) return Results.LocalRedirect(IsLocal(form.ReturnUrl) ? form.ReturnUrl! : "/");
        var error = result.IsLockedOut ? "locked" : "invalid";
        return Results.LocalRedirect($"{SignInPage}?error={error}&returnUrl={back}");
    }

    // Only paths on this site, never "//host" or "/\host", so a crafted link cannot send users elsewhere.
    private static bool IsLocal(string? url) =>
        !string.IsNullOrEmpty(url) && url[0] == '/' && (url.Length == 1 || (url[1] != '/' && url[1] != '\\'));

    public sealed class SignInForm
    {
        public string? UserName { get; set; }
        public string? Password { get; set; }
        public string? ReturnUrl { get; set; }
    }
}
