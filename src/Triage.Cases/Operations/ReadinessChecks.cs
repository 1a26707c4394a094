using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Diagnostics.HealthChecks;
using Triage.Cases.Instances;
using Triage.Cases.Intake;
using Triage.Cases.Store;

namespace Triage.Cases.Operations;

/// <summary>The store answers and every migration this build ships has been applied to it.</summary>
public sealed class StoreReadyCheck(TriageDbContext db) : IHealthCheck
{
    public async Task<HealthCheckResult> CheckHealthAsync(HealthCheckContext context, CancellationToken ct = default)
    {
        try
        {
            if (!await db.Database.CanConnectAsync(ct)) return HealthCheckResult.Unhealthy("The store cannot be reached.");
            var pending = (await db.Database.GetPendingMigrationsAsync(ct)).ToList();
            return pending.Count == 0
                ? HealthCheckResult.Healthy($"Store reachable ({db.Database.ProviderName}), migrations applied.")
                : HealthCheckResult.Unhealthy($"{pending.Count} migration(s) not applied yet, first {pending[0]}; the app applies them on start.");
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            return HealthCheckResult.Unhealthy("The store cannot be reached.", e);
        }
    }
}

/// <summary>
/// The registry's serving model is loaded here (loading it if needed), so arriving claims can be scored.
/// A store with no serving model yet is degraded rather than down: everything but intake works.
/// </summary>
public sealed class ServingModelCheck(TriageDbContext db, ServingModels serving) : IHealthCheck
{
    public async Task<HealthCheckResult> CheckHealthAsync(HealthCheckContext context, CancellationToken ct = default)
    {
        try
        {
            if (!await db.ModelVersions.AnyAsync(m => m.IsServing, ct))
                return HealthCheckResult.Degraded("No model serves yet; intake refuses claims until one is promoted.");
            var (version, _) = await serving.CurrentAsync(db, ct);
            return HealthCheckResult.Healthy($"Model {version.Version} serves.");
        }
        catch (Exception e) when (e is not OperationCanceledException)
        {
            return HealthCheckResult.Unhealthy($"The serving model cannot be loaded: {e.Message}", e);
        }
    }
}

/// <summary>With PostgreSQL: this instance hears the others' notices. Degraded while it reconnects (pages here miss live updates meanwhile).</summary>
public sealed class InstanceLinkCheck(PostgresNoticeListener listener) : IHealthCheck
{
    public Task<HealthCheckResult> CheckHealthAsync(HealthCheckContext context, CancellationToken ct = default) =>
        Task.FromResult(listener.IsListening
            ? HealthCheckResult.Healthy("Listening for other instances' notices.")
            : HealthCheckResult.Degraded("Not listening for other instances' notices; reconnecting."));
}
