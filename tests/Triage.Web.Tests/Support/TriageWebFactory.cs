using Microsoft.AspNetCore.Hosting;
using Microsoft.AspNetCore.Mvc.Testing;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Support;

namespace Triage.Web.Tests.Support;

/// <summary>The real app over a temp data folder and the tiny generated seed; first start runs once per factory.</summary>
public sealed class TriageWebFactory : WebApplicationFactory<Program>
{
    public string Folder { get; } = Path.Combine(Path.GetTempPath(), "triage-web-tests", Guid.NewGuid().ToString("N"));

    protected override void ConfigureWebHost(IWebHostBuilder builder)
    {
        var seed = TinySeed.Write(Path.Combine(Folder, "seed"), historyRows: 400, openRows: 60);
        builder.ConfigureAppConfiguration(c => c.AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Storage:Provider"] = "Sqlite",
            ["Storage:DataFolder"] = Path.Combine(Folder, "data"),
            ["Demo:Enabled"] = "true",
            ["Demo:SeedFolder"] = seed,
            ["Demo:Password"] = TinySeed.Password,
            ["Queue:Threshold"] = "0.25",
        }));
    }

    public override async ValueTask DisposeAsync()
    {
        await base.DisposeAsync();
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        try { Directory.Delete(Folder, recursive: true); } catch (IOException) { /* the OS still holds a file */ }
    }
}
