using Triage.Cases.Hosting;

namespace Triage.Cases.Instances;

/// <summary>
/// Locks for the SQLite store: one instance of the app uses it, but the command line may work on the same file at the
/// same time (a retrain from each would race for one version name and one model file). Each lock is an exclusive OS
/// lock on a file next to the database (<c>triage.db.retrain.lock</c>), which the OS drops when its holder dies.
/// </summary>
public sealed class FileLocks(TriagePaths paths) : IClusterLocks
{
    public Task<IHeldLock?> TryAcquireAsync(ClusterLock name, CancellationToken ct) => Task.FromResult<IHeldLock?>(TryOpen(name) is { } file ? new Held(file) : null);

    public async Task<IHeldLock> AcquireAsync(ClusterLock name, CancellationToken ct)
    {
        for (var delay = 50; ; delay = Math.Min(2 * delay, 1000))
        {
            if (TryOpen(name) is { } file) return new Held(file);
            await Task.Delay(delay, ct);
        }
    }

    private FileStream? TryOpen(ClusterLock name)
    {
        var path = $"{paths.SqliteFile}.{(name == ClusterLock.Retrain ? "retrain" : "first-start")}.lock";
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        try
        {
            // FileShare.None is an exclusive flock on Linux (a share lock on Windows), between processes and between
            // handles of one process alike.
            return new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
        }
        catch (IOException)
        {
            return null;
        }
    }

    private sealed class Held(FileStream file) : IHeldLock
    {
        // An open handle keeps its lock: nothing outside the process can take it away.
        public Task<bool> StillHeldAsync(CancellationToken ct) => Task.FromResult(true);

        public void Dispose() => file.Dispose();
    }
}
