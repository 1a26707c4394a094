using System.Threading.Channels;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Triage.Cases.Intake;
using Triage.Cases.Store;

namespace Triage.Cases.Instances;

/// <summary>
/// Keeps the model the registry says serves loaded in this instance. Every request already reads the serving
/// row from the store, so after another instance promotes or rolls back, the next claim here is scored by the
/// new champion; this watch loads that champion's file ahead of time (on a "model promoted" notice, or at the
/// latest after <see cref="InstanceOptions.ModelCheckSeconds"/>) so no request waits for it, and logs the switch.
/// </summary>
public sealed class ServingModelWatch(IServiceScopeFactory scopes, ServingModels serving, IOptions<InstanceOptions> options,
    ILogger<ServingModelWatch> log) : BackgroundService
{
    private readonly Channel<bool> _nudges = Channel.CreateBounded<bool>(new BoundedChannelOptions(1) { FullMode = BoundedChannelFullMode.DropWrite });

    /// <summary>Asks for a check now rather than at the next period (a notice arrived, or the listener reconnected).</summary>
    public void CheckSoon() => _nudges.Writer.TryWrite(true);

    protected override async Task ExecuteAsync(CancellationToken stop)
    {
        var period = TimeSpan.FromSeconds(options.Value.ModelCheckSeconds);
        while (!stop.IsCancellationRequested)
        {
            try
            {
                await CheckAsync(stop);
            }
            catch (OperationCanceledException) when (stop.IsCancellationRequested)
            {
                break;
            }
            catch (Exception e)
            {
                // The store is down or the file unreadable: requests report it themselves; try again next time.
                log.LogWarning(e, "Could not check which model serves");
            }
            using var wait = CancellationTokenSource.CreateLinkedTokenSource(stop);
            wait.CancelAfter(period);
            try { await _nudges.Reader.ReadAsync(wait.Token); }
            catch (OperationCanceledException) when (!stop.IsCancellationRequested) { /* the period passed */ }
            catch (OperationCanceledException) { break; }
        }
    }

    /// <summary>Reads the serving row and loads its model if this instance does not hold it yet; returns the version serving.</summary>
    public async Task<string?> CheckAsync(CancellationToken ct)
    {
        await using var scope = scopes.CreateAsyncScope();
        var db = scope.ServiceProvider.GetRequiredService<TriageDbContext>();
        var before = serving.Version;
        // Loading a file is blocking work: keep it off the caller's thread.
        var now = await Task.Run(() => serving.RefreshAsync(db, ct), ct);
        if (now != before) log.LogInformation("Serving model is now {Version} (was {Before})", now ?? "none", before ?? "none");
        return now;
    }
}
