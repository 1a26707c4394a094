using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Triage.Cases;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;

namespace Triage.Cli.Import;

/// <summary>The case services over the same store and settings the web app uses, brought up to date before use.</summary>
internal static class StoreHost
{
    /// <summary>
    /// Who the command line acts as. Whoever can run it on the server can already read the data folder,
    /// so it holds the analyst and admin roles its commands need; the audit trail names the OS user.
    /// </summary>
    public static Actor Operator { get; } = new("cli", $"cli:{Environment.UserName}", new HashSet<string> { Roles.Analyst, Roles.Admin });

    public static async Task<IHost> StartAsync(Action<IConfigurationBuilder>? configure, CancellationToken ct)
    {
        var b = Host.CreateApplicationBuilder();
        b.Configuration.AddTriageSettings(b.Environment.EnvironmentName);
        configure?.Invoke(b.Configuration);
        // Results go to stdout (a new key's secret, for one); the host's own logging keeps to warnings on stderr.
        b.Configuration.AddInMemoryCollection(new Dictionary<string, string?> { ["Logging:LogLevel:Default"] = "Warning", ["Logging:LogLevel:Microsoft.EntityFrameworkCore"] = "Warning" });
        b.Logging.ClearProviders();
        b.Logging.AddConsole(o => o.LogToStandardErrorThreshold = LogLevel.Trace);
        b.AddTriageCases();
        var host = b.Build();
        await host.Services.InitialiseStoreAsync(ct);
        return host;
    }
}
