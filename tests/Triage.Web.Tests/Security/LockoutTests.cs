using System.Net;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Support;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Security;

/// <summary>Account lockout from the Security section: the count and the time come from settings, and the page says both.</summary>
public sealed class LockoutTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    private WebApplicationFactory<Program> With(params (string Key, string Value)[] settings) => factory.WithWebHostBuilder(b =>
        b.ConfigureAppConfiguration(c => c.AddInMemoryCollection(settings.ToDictionary(s => s.Key, s => (string?)s.Value))));

    [Fact]
    public async Task Two_failures_lock_the_account_when_the_setting_says_two_and_the_page_says_for_how_long()
    {
        await using var app = With(("Security:LockoutFailures", "2"), ("Security:LockoutMinutes", "7"));
        var client = SignInClient.Anonymous(app);
        Assert.Contains("error=invalid", (await SignInClient.PostAsync(client, "tomas.reed", "wrong-1")).Headers.Location!.OriginalString);
        Assert.Contains("error=locked", (await SignInClient.PostAsync(client, "tomas.reed", "wrong-2")).Headers.Location!.OriginalString);
        // Locked: even the right password is refused, and the page says why and for how long.
        var refused = await SignInClient.PostAsync(client, "tomas.reed", TinySeed.Password);
        Assert.Contains("error=locked", refused.Headers.Location!.OriginalString);
        var page = await client.GetStringAsync(refused.Headers.Location!.OriginalString);
        Assert.Contains("locked after 2 failed attempts in a row; try again in 7 minutes", page);
        // Another account is not affected.
        Assert.Equal("/", (await SignInClient.PostAsync(SignInClient.Anonymous(app), "mara.holt", TinySeed.Password)).Headers.Location!.OriginalString);
    }

    [Fact]
    public async Task A_failure_count_is_reset_by_a_good_sign_in()
    {
        await using var app = With(("Security:LockoutFailures", "2"));
        var client = SignInClient.Anonymous(app);
        await SignInClient.PostAsync(client, "ines.varga", "wrong");
        Assert.Equal("/", (await SignInClient.PostAsync(client, "ines.varga", TinySeed.Password)).Headers.Location!.OriginalString);
        Assert.Contains("error=invalid", (await SignInClient.PostAsync(SignInClient.Anonymous(app), "ines.varga", "wrong")).Headers.Location!.OriginalString);
    }

    [Theory]
    [InlineData("Security:LockoutFailures", "0")]
    [InlineData("Security:LockoutMinutes", "0")]
    public async Task A_lockout_setting_out_of_range_stops_the_app_naming_the_key(string key, string value)
    {
        await using var app = With((key, value));
        var e = await Assert.ThrowsAnyAsync<Exception>(() => Task.Run(() => app.CreateClient()));
        Assert.Contains(key.Split(':')[1], e.ToString());
    }
}
