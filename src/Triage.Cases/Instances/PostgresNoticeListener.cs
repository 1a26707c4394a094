using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Npgsql;
using Triage.Cases.CaseWork;
using Triage.Cases.Options;

namespace Triage.Cases.Instances;

/// <summary>
/// LISTENs for the other instances' notices on a connection of its own and acts on them here: a case notice
/// is re-published on this instance's <see cref="CaseEvents"/> (so open pages reload), a model notice makes
/// <see cref="ServingModelWatch"/> check the registry now. A dropped connection is logged and reopened with a
/// doubling wait; notices sent meanwhile are lost, so after every reconnect the model is checked at once.
/// </summary>
public sealed class PostgresNoticeListener(
    IOptions<StorageOptions> storage,
    IOptions<InstanceOptions> options,
    InstanceId self,
    CaseEvents events,
    ServingModelWatch models,
    ILogger<PostgresNoticeListener> log) : BackgroundService
{
    private readonly TaskCompletionSource _firstListen = new(TaskCreationOptions.RunContinuationsAsynchronously);
    private volatile bool _listening;

    /// <summary>True while the LISTEN connection is open (the readiness check reports it).</summary>
    public bool IsListening => _listening;

    /// <summary>Completes once LISTEN first succeeded: from then on other instances' notices arrive.</summary>
    public Task Listening => _firstListen.Task;

    protected override async Task ExecuteAsync(CancellationToken stop)
    {
        var builder = new NpgsqlConnectionStringBuilder(storage.Value.ConnectionString)
        {
            // Its own physical connection, never handed back to a pool while listening; keepalives make a dead
            // server show up as an error in WaitAsync instead of a wait that never ends.
            Pooling = false,
            KeepAlive = 15,
            ApplicationName = "triage listener",
        };
        var delay = TimeSpan.FromSeconds(1);
        var longest = TimeSpan.FromSeconds(options.Value.ReconnectMaxSeconds);
        while (!stop.IsCancellationRequested)
        {
            try
            {
                await using var conn = new NpgsqlConnection(builder.ConnectionString);
                conn.Notification += (_, e) => Receive(e.Payload);
                await conn.OpenAsync(stop);
                await using (var listen = new NpgsqlCommand($"LISTEN {PostgresNotices.Channel}", conn))
                    await listen.ExecuteNonQueryAsync(stop);
                _listening = true;
                delay = TimeSpan.FromSeconds(1);
                log.LogInformation("Instance {Instance} listening for other instances on channel {Channel}", self, PostgresNotices.Channel);
                _firstListen.TrySetResult();
                models.CheckSoon();
                while (true) await conn.WaitAsync(stop);
            }
            catch (OperationCanceledException) when (stop.IsCancellationRequested)
            {
                break;
            }
            catch (Exception e)
            {
                _listening = false;
                log.LogWarning(e, "Notice listener lost its connection; reconnecting in {Seconds} s", delay.TotalSeconds);
                try { await Task.Delay(delay, stop); }
                catch (OperationCanceledException) { break; }
                delay = TimeSpan.FromTicks(Math.Min(delay.Ticks * 2, longest.Ticks));
            }
        }
        _listening = false;
    }

    private void Receive(string payload)
    {
        var notice = InstanceNotice.FromPayload(payload);
        if (notice is null)
        {
            log.LogWarning("Ignored a notice that is not ours on {Channel}: {Payload}", PostgresNotices.Channel, payload.Length > 200 ? payload[..200] : payload);
            return;
        }
        // Our own notice: this instance acted on it when it sent it.
        if (notice.From == self.Value) return;
        try
        {
            if (notice.CaseId is { } caseId) events.PublishLocal(caseId, notice.What);
            if (notice.Model is not null) models.CheckSoon();
        }
        catch (Exception e)
        {
            // A page's handler failing must not take the listener down.
            log.LogWarning(e, "Acting on {What} from instance {From} failed", notice.What, notice.From);
        }
    }
}
