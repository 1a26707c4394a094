using System.Threading.Channels;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Npgsql;
using Triage.Cases.Options;

namespace Triage.Cases.Instances;

/// <summary>
/// Sends notices to the other instances with PostgreSQL's NOTIFY on <see cref="Channel"/>. Sending runs off
/// the caller's thread (a page's save should not wait on it); a notice that cannot be sent is logged and
/// dropped, since the other instances' pages reload anyway when next opened and the model check repeats.
/// </summary>
public sealed class PostgresNotices : IInstanceNotices, IAsyncDisposable, IDisposable
{
    /// <summary>The NOTIFY channel every instance listens on.</summary>
    public const string Channel = "triage_instances";
    // Enough for a burst of auto-balance notices; past it the oldest go, rather than memory growing while the store is down.
    private const int Capacity = 10_000;

    private readonly Channel<InstanceNotice> _queue =
        System.Threading.Channels.Channel.CreateBounded<InstanceNotice>(new BoundedChannelOptions(Capacity) { FullMode = BoundedChannelFullMode.DropOldest, SingleReader = true });
    private readonly string _connection;
    private readonly ILogger<PostgresNotices> _log;
    private readonly Lazy<Task> _sender;

    public PostgresNotices(IOptions<StorageOptions> storage, ILogger<PostgresNotices> log)
    {
        _connection = new NpgsqlConnectionStringBuilder(storage.Value.ConnectionString) { ApplicationName = "triage notices" }.ConnectionString;
        _log = log;
        // Started by the first notice, so the command line (which runs no hosted services) sends too.
        _sender = new(() => Task.Run(SendAllAsync));
    }

    public void Send(InstanceNotice notice)
    {
        _queue.Writer.TryWrite(notice);
        _ = _sender.Value;
    }

    private async Task SendAllAsync()
    {
        await foreach (var notice in _queue.Reader.ReadAllAsync())
        {
            try
            {
                await using var conn = new NpgsqlConnection(_connection);
                await conn.OpenAsync();
                await using var cmd = new NpgsqlCommand("SELECT pg_notify(@channel, @payload)", conn);
                cmd.Parameters.AddWithValue("channel", Channel);
                cmd.Parameters.AddWithValue("payload", notice.ToPayload());
                await cmd.ExecuteNonQueryAsync();
            }
            catch (Exception e)
            {
                // Whatever went wrong, the loop goes on: the next notice may well get through.
                _log.LogWarning(e, "Could not tell the other instances about {What} (case {Case}, model {Model})", notice.What, notice.CaseId, notice.Model);
            }
        }
    }

    /// <summary>Sends what is queued (waiting a few seconds at most), so a short-lived command line process does not lose its notices.</summary>
    public async ValueTask DisposeAsync()
    {
        _queue.Writer.TryComplete();
        if (_sender.IsValueCreated) await Task.WhenAny(_sender.Value, Task.Delay(TimeSpan.FromSeconds(5)));
    }

    public void Dispose() => DisposeAsync().AsTask().GetAwaiter().GetResult();
}
