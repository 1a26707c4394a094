using System.Net;
using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Accounts;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests;

/// <summary>With the demo off the sign-in page lists nobody; accounts come from the same service the CLI uses.</summary>
public sealed class DemoOffSignInTests(DemoOffSignInTests.Factory factory) : IClassFixture<DemoOffSignInTests.Factory>
{
    public sealed class Factory : WebApplicationFactory<Program>
    {
        private readonly string _folder = Path.Combine(Path.GetTempPath(), "triage-web-tests", Guid.NewGuid().ToString("N"));

        protected override void ConfigureWebHost(IWebHostBuilder builder)
        {
            var seed = TinySeed.Write(Path.Combine(_folder, "seed"), historyRows: 300, openRows: 20);
            builder.ConfigureAppConfiguration(c => c.AddInMemoryCollection(new Dictionary<string, string?>
            {
                ["Storage:Provider"] = "Sqlite",
                ["Storage:DataFolder"] = Path.Combine(_folder, "data"),
                ["Demo:Enabled"] = "false",
                ["Demo:SeedFolder"] = seed,
                ["Demo:Password"] = TinySeed.Password,
            }));
        }

        public override async ValueTask DisposeAsync()
        {
            await base.DisposeAsync();
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            try { Directory.Delete(_folder, recursive: true); } catch (IOException) { /* the OS still holds a file */ }
        }
    }

    private HttpClient Client() => factory.CreateClient(new WebApplicationFactoryClientOptions { AllowAutoRedirect = false, HandleCookies = true });

    [Fact]
    public async Task The_sign_in_page_lists_no_accounts_and_shows_no_password()
    {
        var html = await Client().GetStringAsync("/signin");
        Assert.DoesNotContain("Demo accounts", html);
        Assert.DoesNotContain(TinySeed.Password, html);
        Assert.DoesNotContain("demo-account", html);
    }

    [Fact]
    public async Task An_account_made_as_the_cli_makes_it_signs_in_and_opens_the_queue()
    {
        using (var scope = factory.Services.CreateScope())
            await scope.ServiceProvider.GetRequiredService<UserAccounts>().AddAsync(Actor.System,
                new NewAccount("rhea.moss", "Rhea Moss", "rhea@larchmere.test", [Roles.Investigator], ["home"], 6), "Lantern-field-77");
        var client = Client();
        var signedIn = await SignInClient.PostAsync(client, "rhea.moss", "Lantern-field-77");
        Assert.Equal("/", signedIn.Headers.Location!.OriginalString);
        var queue = await client.GetAsync("/");
        Assert.Equal(HttpStatusCode.OK, queue.StatusCode);
        Assert.Contains("Rhea Moss", await queue.Content.ReadAsStringAsync());
    }
}
