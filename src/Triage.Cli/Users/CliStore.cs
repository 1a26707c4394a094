using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Triage.Cases;
using Triage.Cases.Hosting;
using Triage.Cases.Store;

namespace Triage.Cli.Users;

/// <summary>
/// The web app's services over the same settings and store, for commands that change accounts. The store
/// is only migrated, never seeded: creating an account must not train a model.
/// </summary>
public static class CliStore
{
    public static async Task<IHost> OpenAsync(IReadOnlyDictionary<string, string?> overrides, CancellationToken ct)
    {
        var environment = Environment.GetEnvironmentVariable("DOTNET_ENVIRONMENT") ?? Environments.Production;
        var builder = Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { EnvironmentName = environment });
        builder.Configuration.AddTriageSettings(environment);
        builder.Configuration.AddInMemoryCollection(overrides);
        builder.AddTriageCases();
        var host = builder.Build();
        await using var scope = host.Services.CreateAsyncScope();
        await scope.ServiceProvider.GetRequiredService<TriageDbContext>().Database.MigrateAsync(ct);
        return host;
    }
}
