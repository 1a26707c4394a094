using Microsoft.Extensions.Options;
using Npgsql;
using Triage.Cases.Options;

namespace Triage.Cases.Instances;

/// <summary>Work only one instance may do at a time; the values are the PostgreSQL advisory lock keys ("Triage" in ASCII, then a number).</summary>
public enum ClusterLock : long
{
    FirstStart = 0x5472_6961_6765_0001,
    Retrain = 0x5472_6961_6765_0002,
}

/// <summary>
/// Locks that hold across every process sharing the store (instances of the app, the command line), released when
/// the holder disposes the handle or its process dies.
/// </summary>
public interface IClusterLocks
{
    /// <returns>The held lock, or null when another instance holds it.</returns>
    Task<IHeldLock?> TryAcquireAsync(ClusterLock name, CancellationToken ct);

    /// <summary>Waits until the lock is free, then holds it.</summary>
    Task<IHeldLock> AcquireAsync(ClusterLock name, CancellationToken ct);
}

/// <summary>A lock this instance holds; disposing it lets go.</summary>
public interface IHeldLock : IDisposable
{
    /// <summary>
    /// Whether the lock is still this instance's. A lock can be lost without letting go of it (the database
    /// session it lives on ends), and work guarded by it must not then be committed as if it were alone.
    /// </summary>
    Task<bool> StillHeldAsync(CancellationToken ct);
}

/// <summary>
/// PostgreSQL session-level advisory locks, each on a connection of its own outside the pool: disposing the
/// handle closes that session, which releases the lock, and so does the server when the holder's process
/// dies and its connection drops. Keepalives let the server notice a vanished holder sooner.
/// </summary>
public sealed class PostgresAdvisoryLocks(IOptions<StorageOptions> storage) : IClusterLocks
{
    public async Task<IHeldLock?> TryAcquireAsync(ClusterLock name, CancellationToken ct)
    {
        var conn = await OpenAsync(name, ct);
        try
        {
            if (await LockAsync(conn, "pg_try_advisory_lock", name, ct) is true) return new Held(conn);
        }
        catch
        {
            await conn.DisposeAsync();
            throw;
        }
        await conn.DisposeAsync();
        return null;
    }

    public async Task<IHeldLock> AcquireAsync(ClusterLock name, CancellationToken ct)
    {
        var conn = await OpenAsync(name, ct);
        try
        {
            await LockAsync(conn, "pg_advisory_lock", name, ct);
            return new Held(conn);
        }
        catch
        {
            await conn.DisposeAsync();
            throw;
        }
    }

    private async Task<NpgsqlConnection> OpenAsync(ClusterLock name, CancellationToken ct)
    {
        var cs = new NpgsqlConnectionStringBuilder(storage.Value.ConnectionString)
        {
            Pooling = false,
            KeepAlive = 15,
            TcpKeepAlive = true,
            ApplicationName = $"triage lock {name}",
        };
        var conn = new NpgsqlConnection(cs.ConnectionString);
        await conn.OpenAsync(ct);
        return conn;
    }

    private static async Task<object?> LockAsync(NpgsqlConnection conn, string function, ClusterLock name, CancellationToken ct)
    {
        // No command timeout: waiting for the lock may outlast a first start (a minute or more); the token still cancels.
        await using var cmd = new NpgsqlCommand($"SELECT {function}(@key)", conn) { CommandTimeout = 0 };
        cmd.Parameters.AddWithValue("key", (long)name);
        return await cmd.ExecuteScalarAsync(ct);
    }

    private sealed class Held(NpgsqlConnection conn) : IHeldLock
    {
        /// <summary>A session-level advisory lock lasts as long as its session: the lock is held while the session answers.</summary>
        public async Task<bool> StillHeldAsync(CancellationToken ct)
        {
            if (conn.State != System.Data.ConnectionState.Open) return false;
            try
            {
                await using var cmd = new NpgsqlCommand("SELECT 1", conn);
                await cmd.ExecuteScalarAsync(ct);
                return true;
            }
            catch (Exception e) when (e is NpgsqlException or InvalidOperationException)
            {
                // The server ended the session (terminated, restarted) or the network dropped it.
                return false;
            }
        }

        // Closing the unpooled connection ends the session, and with it the lock.
        public void Dispose() => conn.Dispose();
    }
}
