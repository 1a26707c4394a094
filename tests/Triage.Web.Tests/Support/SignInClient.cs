using System.Net;
using System.Text.RegularExpressions;
using Microsoft.AspNetCore.Mvc.Testing;

namespace Triage.Web.Tests.Support;

/// <summary>Signs in the way a browser does: read the form's antiforgery token, post the form with the cookie.</summary>
public static partial class SignInClient
{
    public static HttpClient Anonymous(WebApplicationFactory<Program> factory) =>
        factory.CreateClient(new WebApplicationFactoryClientOptions { AllowAutoRedirect = false, HandleCookies = true });

    public static async Task<string> TokenAsync(HttpClient client)
    {
        var html = await client.GetStringAsync("/signin");
        return Token().Match(html) is { Success: true } m ? WebUtility.HtmlDecode(m.Groups[1].Value)
            : throw new InvalidOperationException("The sign-in page has no antiforgery token.");
    }

    public static async Task<HttpResponseMessage> PostAsync(HttpClient client, string user, string password, string? token = null)
    {
        token ??= await TokenAsync(client);
        return await client.PostAsync("/account/signin", new FormUrlEncodedContent(new Dictionary<string, string>
        {
            ["UserName"] = user, ["Password"] = password, ["ReturnUrl"] = "/", ["__RequestVerificationToken"] = token,
        }));
    }

    [GeneratedRegex("name=\"__RequestVerificationToken\" value=\"([^\"]+)\"")]
    private static partial Regex Token();
}
