using Microsoft.EntityFrameworkCore.Infrastructure;
using Microsoft.EntityFrameworkCore.Storage;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Diagnostics.HealthChecks;
using Triage.Cases.Hosting;
using Triage.Cases.Intake;
using Triage.Cases.Operations;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Operations;

public class ReadinessChecksTests
{
    private static Task<HealthCheckResult> Run(IHealthCheck check) => check.CheckHealthAsync(new HealthCheckContext());

    [Fact]
    public async Task The_store_is_ready_only_once_every_migration_is_applied()
    {
        await using var store = TestStore.Create();
        await using (var fresh = store.NewContext())
        {
            Assert.Equal("The store cannot be reached.", (await Run(new StoreReadyCheck(fresh))).Description);
            await fresh.GetService<IRelationalDatabaseCreator>().CreateAsync();
            var empty = await Run(new StoreReadyCheck(fresh));
            Assert.Equal(HealthStatus.Unhealthy, empty.Status);
            Assert.Contains("not applied yet", empty.Description);
        }
        await using var db = await store.MigratedAsync();
        Assert.Equal(HealthStatus.Healthy, (await Run(new StoreReadyCheck(db))).Status);
        // Migrated but empty: no model serves, so only intake is out.
        var model = await Run(new ServingModelCheck(db, store.Host.Services.GetRequiredService<ServingModels>()));
        Assert.Equal(HealthStatus.Degraded, model.Status);
        Assert.Contains("No model serves", model.Description);
    }

    [Fact]
    public async Task The_serving_model_must_load_from_its_file()
    {
        await using var store = TestStore.Create();
        store.WriteSeed(historyRows: 400, openRows: 30);
        await store.Host.Services.InitialiseStoreAsync();
        await using var db = store.NewContext();
        var paths = store.Host.Services.GetRequiredService<TriagePaths>();
        var ok = await Run(new ServingModelCheck(db, new ServingModels(paths)));
        Assert.Equal(HealthStatus.Healthy, ok.Status);
        Assert.Equal("Model v1 serves.", ok.Description);

        // An instance that cannot read the models folder (say, a data folder that is not shared) is not ready.
        File.Delete(Path.Combine(paths.ModelsFolder, "v1.model"));
        var missing = await Run(new ServingModelCheck(db, new ServingModels(paths)));
        Assert.Equal(HealthStatus.Unhealthy, missing.Status);
        Assert.Contains("v1", missing.Description);
    }
}
