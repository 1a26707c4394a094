using System.ComponentModel.DataAnnotations;
using System.Text.Json;
using System.Threading.Channels;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.Instances;
using Triage.Cases.Store;
using Triage.Scoring;

namespace Triage.Cases.Models;

/// <summary>
/// Starts and cancels retrains for analysts and admins. A retrain from the app runs in the background
/// (<see cref="RetrainWorker"/>); the command line runs one in the foreground through <see cref="RunAsync"/>.
/// Either way only one runs at a time: in a process through <see cref="RetrainState"/>, across processes sharing
/// the store (instances, the command line) through a cluster lock the run holds until it finishes.
/// </summary>
public sealed class RetrainService(RetrainState state, RetrainQueue queue, IServiceScopeFactory scopes, TriageDbContext db,
    IClusterLocks locks, InstanceId self, IOptions<ScoringOptions> defaults, TimeProvider clock)
{
    public static readonly string[] MayRetrain = [Roles.Analyst, Roles.Admin];

    /// <summary>A copy of the "Scoring" section, to edit on the page.</summary>
    public ScoringOptions Defaults() =>
        JsonSerializer.Deserialize<ScoringOptions>(JsonSerializer.Serialize(defaults.Value, RetrainRunner.Json), RetrainRunner.Json)!;

    public async Task<RetrainRun> StartAsync(Actor by, ScoringOptions settings, CancellationToken ct = default)
    {
        var (run, token) = await BeginAsync(by, settings, ct);
        queue.Enqueue(new RetrainJob(run.Id, by, settings, token));
        return run;
    }

    public async Task<RetrainResult> RunAsync(Actor by, ScoringOptions settings, CancellationToken ct = default)
    {
        var (run, token) = await BeginAsync(by, settings, ct);
        await using var scope = scopes.CreateAsyncScope();
        return await scope.ServiceProvider.GetRequiredService<RetrainRunner>().RunAsync(new RetrainJob(run.Id, by, settings, token), ct);
    }

    public async Task CancelAsync(Actor by, CancellationToken ct = default)
    {
        by.Require("cancel a retrain", MayRetrain);
        // A run belongs to the instance that started it; with several instances, cancel it there.
        var run = state.Current ?? throw new DomainRuleException("No retrain is running on this instance.");
        if (!state.RequestCancel()) throw new DomainRuleException("No retrain is running.");
        db.AuditEvents.Add(new AuditEvent(by.UserName, "model.retrain-cancel", $"asked to cancel the retrain started by {run.StartedBy}", Now));
        await db.SaveChangesAsync(ct);
    }

    private async Task<(RetrainRun, CancellationToken)> BeginAsync(Actor by, ScoringOptions settings, CancellationToken ct)
    {
        by.Require("retrain the model", MayRetrain);
        var problems = Check(settings);
        if (problems.Count > 0) throw new DomainRuleException($"The retrain settings are not valid: {string.Join("; ", problems)}");
        if (!state.TryBegin(by.UserName, settings.Trainer, Now, out var run, out var token))
            throw new DomainRuleException($"A retrain started by {run.StartedBy} at {run.StartedAt:HH:mm} UTC is still running ({run.Stage.ToLowerInvariant()}); " +
                "only one runs at a time. Wait for it to finish or cancel it.");
        await HoldClusterLockAsync(run, ct);
        try
        {
            db.AuditEvents.Add(new AuditEvent(by.UserName, "model.retrain-started", $"{settings.Trainer}, holdout {settings.HoldoutMonths} months, on {self}", Now));
            await db.SaveChangesAsync(ct);
        }
        catch (Exception e)
        {
            state.Finish(new RetrainResult(run.Id, RetrainOutcome.Failed, $"Could not start: {e.Message}", null, Now));
            throw;
        }
        return (run, token);
    }

    /// <summary>Takes the lock no other instance may retrain under, or frees this process's slot and says who holds it.</summary>
    private async Task HoldClusterLockAsync(RetrainRun run, CancellationToken ct)
    {
        IHeldLock? held;
        try
        {
            held = await locks.TryAcquireAsync(ClusterLock.Retrain, ct);
        }
        catch
        {
            state.Abandon(run.Id);
            throw;
        }
        if (held is not null)
        {
            state.Hold(run.Id, held);
            return;
        }
        state.Abandon(run.Id);
        // The holder wrote its "started" event right after taking the lock, so the latest one is almost surely its.
        var started = await db.AuditEvents.AsNoTracking().Where(a => a.What == "model.retrain-started")
            .OrderByDescending(a => a.At).ThenByDescending(a => a.Id).FirstOrDefaultAsync(ct);
        var who = started is null ? "" : $" (started by {started.Who} at {started.At:HH:mm} UTC)";
        throw new DomainRuleException($"A retrain is already running on another instance or from the command line{who}; only one runs at a time. " +
            "Wait for it to finish, or cancel it where it runs.");
    }

    /// <summary>The same rules the "Scoring" section is held to on start.</summary>
    public static List<string> Check(ScoringOptions settings)
    {
        var results = new List<ValidationResult>();
        Validator.TryValidateObject(settings, new ValidationContext(settings), results, validateAllProperties: true);
        results.AddRange(settings.Validate(new ValidationContext(settings)));
        return [.. results.Select(r => r.ErrorMessage ?? "invalid value")];
    }

    private DateTime Now => clock.GetUtcNow().UtcDateTime;
}

/// <summary>Retrains waiting for the background worker (at most one, as <see cref="RetrainState"/> allows).</summary>
public sealed class RetrainQueue
{
    private readonly Channel<RetrainJob> _jobs = Channel.CreateUnbounded<RetrainJob>(new UnboundedChannelOptions { SingleReader = true });

    internal void Enqueue(RetrainJob job) => _jobs.Writer.TryWrite(job);

    internal IAsyncEnumerable<RetrainJob> ReadAllAsync(CancellationToken ct) => _jobs.Reader.ReadAllAsync(ct);
}

/// <summary>Runs queued retrains off the request thread, each in its own scope (its own store context).</summary>
public sealed class RetrainWorker(RetrainQueue queue, IServiceScopeFactory scopes) : BackgroundService
{
    protected override async Task ExecuteAsync(CancellationToken stoppingToken)
    {
        await foreach (var job in queue.ReadAllAsync(stoppingToken))
        {
            await using var scope = scopes.CreateAsyncScope();
            // The runner catches everything and records why; a stopping host cancels the run like the button does.
            await scope.ServiceProvider.GetRequiredService<RetrainRunner>().RunAsync(job, stoppingToken);
        }
    }
}
