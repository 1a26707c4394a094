using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Instances;
using Triage.Cases.Store;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Instances;

/// <summary>
/// Two app instances (two hosts with the case services) on one store and one data folder, both started, so
/// their background services (notice listener, model watch, retrain worker) run. Both first-start at once.
/// </summary>
public sealed class TwoInstances : IAsyncDisposable
{
    public static readonly TimeSpan Patience = TimeSpan.FromSeconds(60);

    private readonly TestStore _store;

    public IHost A => _store.Host;
    public IHost B { get; }

    private TwoInstances(TestStore store, IHost b)
    {
        _store = store;
        B = b;
    }

    public static async Task<TwoInstances> StartAsync(string provider, Dictionary<string, string?>? extra = null)
    {
        var settings = new Dictionary<string, string?>
        {
            ["Scoring:FastTree:NumberOfTrees"] = "20",
            ["Scoring:FastTree:NumberOfLeaves"] = "6",
            ["Scoring:FastTree:MinimumExampleCountPerLeaf"] = "5",
        };
        foreach (var (k, v) in extra ?? []) settings[k] = v;
        var store = TestStore.Create(provider, settings);
        store.WriteSeed(historyRows: 500, openRows: 80);
        // B reads exactly A's settings: same store, same data folder.
        var config = store.Host.Services.GetRequiredService<IConfiguration>();
        var shared = config.AsEnumerable()
            .Where(kv => kv.Value is not null && new[] { "Storage:", "Demo:", "Queue:", "Scoring:", "Instances:" }.Any(kv.Key.StartsWith))
            .ToDictionary(kv => kv.Key, kv => kv.Value);
        var builder = Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { EnvironmentName = "Testing" });
        builder.Configuration.AddTriageSettings("Testing");
        builder.Configuration.AddInMemoryCollection(shared);
        builder.Services.AddSingleton<TimeProvider>(new FixedClock(TestStore.Today));
        builder.AddTriageCases();
        var b = builder.Build();
        var both = new TwoInstances(store, b);
        try
        {
            if (provider == "Postgres")
                // Started together on a store that does not exist yet: one creates and seeds it, the other waits its turn.
                await Task.WhenAll(Task.Run(() => store.Host.Services.InitialiseStoreAsync()), Task.Run(() => b.Services.InitialiseStoreAsync()));
            else
            {
                // SQLite serves one instance; a second host reads the same file here only to watch the registry.
                await store.Host.Services.InitialiseStoreAsync();
                await b.Services.InitialiseStoreAsync();
            }
            await store.Host.StartAsync();
            await b.StartAsync();
            if (provider == "Postgres")
                await Task.WhenAll(Listening(store.Host), Listening(b));
        }
        catch
        {
            await both.DisposeAsync();
            throw;
        }
        return both;
    }

    private static Task Listening(IHost host) => host.Services.GetRequiredService<PostgresNoticeListener>().Listening.WaitAsync(Patience);

    public async Task<T> InScopeAsync<T>(IHost host, Func<IServiceProvider, Task<T>> use)
    {
        await using var scope = host.Services.CreateAsyncScope();
        return await use(scope.ServiceProvider);
    }

    public TriageDbContext NewContext() => _store.NewContext();

    public async Task<Actor> ActorAsync(string userName, params string[] roles)
    {
        await using var db = NewContext();
        var id = await db.Users.Where(u => u.UserName == userName).Select(u => u.Id).SingleAsync();
        return new Actor(id, userName, new HashSet<string>(roles));
    }

    /// <summary>Polls until <paramref name="done"/> holds; fails only after a generous timeout.</summary>
    public static async Task EventuallyAsync(Func<bool> done, string what)
    {
        using var timeout = new CancellationTokenSource(Patience);
        while (!done())
        {
            if (timeout.IsCancellationRequested) Assert.Fail($"Timed out waiting for {what}.");
            await Task.Delay(50);
        }
    }

    public async ValueTask DisposeAsync()
    {
        foreach (var host in new[] { B, A })
        {
            try { await host.StopAsync(); } catch (OperationCanceledException) { /* already stopping */ }
        }
        B.Dispose();
        await _store.DisposeAsync();
    }
}
