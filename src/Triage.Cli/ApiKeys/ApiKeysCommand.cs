using System.CommandLine;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.ApiKeys;
using Triage.Cases.Domain;
using Triage.Cli.Import;

namespace Triage.Cli.ApiKeys;

/// <summary><c>triage api-keys create|list|revoke</c>: keys other systems send claims with.</summary>
public static class ApiKeysCommand
{
    public static Command Create(Action<IConfigurationBuilder>? configure = null)
    {
        var name = new Option<string>("--name") { Description = "Which system will use the key.", Required = true };
        var create = new Command("create", "Create an intake key and print it (this once; only its hash is kept).") { name };
        create.SetAction((parse, ct) => RunAsync(configure, ct, async keys =>
        {
            var issued = await keys.CreateAsync(parse.GetValue(name)!, StoreHost.Operator, ct);
            Console.WriteLine(issued.Secret);
            Console.Error.WriteLine($"Key {issued.Key.Id} '{issued.Key.Name}' created. It is shown only now: send it in the X-Api-Key header.");
        }));

        var list = new Command("list", "List keys: id, prefix, name, state, last use.");
        list.SetAction((parse, ct) => RunAsync(configure, ct, async keys =>
        {
            foreach (var k in await keys.ListAsync(StoreHost.Operator, ct))
                Console.WriteLine($"{k.Id}\t{k.KeyPrefix}…\t{k.Name}\t{(k.IsActive ? "active" : $"revoked {k.RevokedAt:yyyy-MM-dd} by {k.RevokedBy}")}\tlast used {k.LastUsedAt?.ToString("yyyy-MM-dd HH:mm") ?? "never"}");
        }));

        var key = new Argument<string>("key") { Description = "The key's id or its prefix as listed." };
        var revoke = new Command("revoke", "Revoke a key: requests with it are refused from now on.") { key };
        revoke.SetAction((parse, ct) => RunAsync(configure, ct, async keys =>
        {
            var revoked = await keys.RevokeAsync(parse.GetValue(key)!, StoreHost.Operator, ct);
            Console.WriteLine($"Key {revoked.Id} '{revoked.Name}' revoked.");
        }));

        return new Command("api-keys", "Manage the API keys for POST /api/claims.") { create, list, revoke };
    }

    private static async Task<int> RunAsync(Action<IConfigurationBuilder>? configure, CancellationToken ct, Func<ApiKeyService, Task> action)
    {
        try
        {
            using var host = await StoreHost.StartAsync(configure, ct);
            await using var scope = host.Services.CreateAsyncScope();
            await action(scope.ServiceProvider.GetRequiredService<ApiKeyService>());
            return 0;
        }
        catch (DomainRuleException e)
        {
            Console.Error.WriteLine($"error: {e.Message}");
            return 1;
        }
    }
}
