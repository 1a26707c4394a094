using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Models;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Models;

/// <summary>A fresh store per test after first start on the tiny seed (demo team, closed demo cases, v1 serving), small trees.</summary>
public sealed class ModelStore : IAsyncDisposable
{
    public static readonly Actor Analyst = new("id-analyst", "ana.lyst", new HashSet<string> { Roles.Analyst });
    public static readonly Actor Manager = new("id-manager", "man.ager", new HashSet<string> { Roles.Manager });
    public static readonly Actor Investigator = new("id-inv", "in.vest", new HashSet<string> { Roles.Investigator });

    public TestStore Store { get; }

    private ModelStore(TestStore store) => Store = store;

    public static async Task<ModelStore> CreateAsync(string provider = "Sqlite")
    {
        var store = TestStore.Create(provider, new()
        {
            ["Scoring:FastTree:NumberOfTrees"] = "20",
            ["Scoring:FastTree:NumberOfLeaves"] = "6",
            ["Scoring:FastTree:MinimumExampleCountPerLeaf"] = "5",
        });
        store.WriteSeed(historyRows: 500, openRows: 60);
        await store.Host.Services.InitialiseStoreAsync();
        return new ModelStore(store);
    }

    public T Get<T>() where T : notnull => Store.Host.Services.GetRequiredService<T>();

    public async Task<T> InScopeAsync<T>(Func<IServiceProvider, Task<T>> use)
    {
        await using var scope = Store.Host.Services.CreateAsyncScope();
        return await use(scope.ServiceProvider);
    }

    public Task<RetrainResult> RetrainAsync(Actor? by = null) =>
        InScopeAsync(sp => { var r = sp.GetRequiredService<RetrainService>(); return r.RunAsync(by ?? Analyst, r.Defaults()); });

    public async Task<List<ModelVersion>> VersionsAsync()
    {
        await using var db = Store.NewContext();
        return await db.ModelVersions.AsNoTracking().Include(v => v.Changes).OrderBy(v => v.Id).ToListAsync();
    }

    public async Task<List<string>> AuditAsync(string prefix)
    {
        await using var db = Store.NewContext();
        return await db.AuditEvents.AsNoTracking().Where(a => a.What.StartsWith(prefix)).OrderBy(a => a.Id).Select(a => a.What + ": " + a.Detail).ToListAsync();
    }

    public string ModelsFolder => Get<TriagePaths>().ModelsFolder;

    public ValueTask DisposeAsync() => Store.DisposeAsync();
}
