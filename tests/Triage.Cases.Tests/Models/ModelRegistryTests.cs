using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Cases.Models;

namespace Triage.Cases.Tests.Models;

public class ModelRegistryTests
{
    [Fact]
    public async Task Promote_switches_serving_without_restart_and_rescoring_keeps_old_drivers()
    {
        await using var s = await ModelStore.CreateAsync();
        await s.RetrainAsync();
        await using (var before = s.Store.NewContext())
            Assert.Equal("v1", (await s.Get<ServingModels>().CurrentAsync(before, default)).Version.Version);
        int openCases, oldDrivers;
        await using (var db = s.Store.NewContext())
        {
            openCases = await db.Cases.CountAsync(c => c.IsOpen);
            oldDrivers = await db.Drivers.CountAsync(d => db.Cases.Any(c => c.Id == d.CaseId && c.IsOpen));
        }
        Assert.True(openCases > 0);

        var change = await s.InScopeAsync(sp => sp.GetRequiredService<ModelRegistry>().PromoteAsync(ModelStore.Analyst, "v2", "Better precision at capacity", rescoreOpenCases: true));
        Assert.Equal(new ServingChange("v2", "v1", openCases), change);

        await using (var db = s.Store.NewContext())
        {
            // Same host, same ServingModels singleton: the next request scores with v2.
            var (version, model) = await s.Get<ServingModels>().CurrentAsync(db, default);
            Assert.Equal(("v2", "v2"), (version.Version, model.Metadata.Version));
            Assert.Equal(openCases, await db.Cases.CountAsync(c => c.IsOpen && c.ModelVersion == "v2"));
            Assert.Equal(oldDrivers, await db.SupersededDrivers.CountAsync(d => d.ModelVersion == "v1"));
            var c = await db.Cases.Include(x => x.Claim).Include(x => x.Drivers).FirstAsync(x => x.IsOpen);
            var fresh = model.Explain(c.Claim!.FieldValues());
            Assert.Equal(fresh.Probability, c.Probability, 12);
            Assert.Equal(fresh.Drivers.Select(d => d.Field), c.Drivers.OrderBy(d => d.Rank).Select(d => d.Field));
            // Closed cases keep the score they were worked on.
            Assert.False(await db.Cases.AnyAsync(x => !x.IsOpen && x.ModelVersion == "v2"));
        }
        Assert.StartsWith("model.promoted: v2 (FastTree) serves, replacing v1: Better precision at capacity;", (await s.AuditAsync("model.promoted")).Last());
        Assert.Equal(openCases, (await s.AuditAsync("case.rescored")).Count);

        var back = await s.InScopeAsync(sp => sp.GetRequiredService<ModelRegistry>().RollBackAsync(ModelStore.Analyst, "v1", "Queue too long with v2", rescoreOpenCases: false));
        Assert.Equal(new ServingChange("v1", "v2", 0), back);
        var versions = await s.VersionsAsync();
        Assert.Equal([("v1", ModelStatus.Champion), ("v2", ModelStatus.Retired)], versions.Select(v => (v.Version, v.Status)));
        Assert.Equal([ModelChangeKind.Trained, ModelChangeKind.Promoted, ModelChangeKind.Retired, ModelChangeKind.RolledBack],
            versions[0].Changes.OrderBy(c => c.Id).Select(c => c.Kind));
        Assert.Contains("v1 (FastTree) serves, replacing v2: Queue too long", Assert.Single(await s.AuditAsync("model.rolled-back")));
    }

    [Fact]
    public async Task Refusals_leave_the_registry_as_it_was()
    {
        await using var s = await ModelStore.CreateAsync();
        await s.RetrainAsync();
        await s.InScopeAsync(async sp =>
        {
            var r = sp.GetRequiredService<ModelRegistry>();
            await Assert.ThrowsAsync<AccessDeniedException>(() => r.PromoteAsync(ModelStore.Manager, "v2", "x", false));
            await Assert.ThrowsAsync<AccessDeniedException>(() => r.ListAsync(ModelStore.Investigator));
            Assert.Equal(2, (await r.ListAsync(ModelStore.Manager)).Count);
            Assert.Contains("no model version 'v9'", (await Assert.ThrowsAsync<DomainRuleException>(() => r.PromoteAsync(ModelStore.Analyst, "v9", "x", false))).Message);
            Assert.Contains("never served", (await Assert.ThrowsAsync<DomainRuleException>(() => r.RollBackAsync(ModelStore.Analyst, "v2", "x", false))).Message);
            return 0;
        });
        Assert.Equal([("v1", ModelStatus.Champion), ("v2", ModelStatus.Challenger)], (await s.VersionsAsync()).Select(v => (v.Version, v.Status)));
    }

    [Fact]
    public async Task A_model_whose_file_cannot_be_read_is_refused_before_anything_switches()
    {
        await using var s = await ModelStore.CreateAsync();
        await s.RetrainAsync();
        var v2 = (await s.VersionsAsync())[1];
        var file = Path.Combine(s.Store.Folder, "data", v2.FilePath);
        Assert.True(File.Exists(file), file);
        File.Delete(file);
        var e = await Assert.ThrowsAsync<DomainRuleException>(() => s.InScopeAsync(sp => sp.GetRequiredService<ModelRegistry>().PromoteAsync(ModelStore.Analyst, "v2", "x", true)));
        Assert.Contains("cannot be read", e.Message);
        Assert.Equal([("v1", ModelStatus.Champion), ("v2", ModelStatus.Challenger)], (await s.VersionsAsync()).Select(v => (v.Version, v.Status)));
        Assert.DoesNotContain(await s.AuditAsync("model.promoted"), a => a.Contains("v2"));
    }
}
