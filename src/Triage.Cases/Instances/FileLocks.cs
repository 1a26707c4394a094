using Triage.Cases.Hosting;
using Triage.Cases.Store;

namespace Triage.Cases.Instances;

/// <summary>
/// Locks for the SQLite store: one instance of the app uses it, but the command line may work on the same file at the
/// same time (a retrain from each would race for one version name and one model file). Each lock is an exclusive OS
/// lock on a file next to the database (<c>triage.db.retrain.lock</c>), which the OS drops when its holder dies.
/// </summary>
public sealed class FileLocks(TriagePaths paths) : IClusterLocks
{
    public Task<IHeldLock?> TryAcquireAsync(ClusterLock name, CancellationToken ct) =>
        Task.FromResult<IHeldLock?>(ExclusiveFile.TryOpen(PathOf(name)) is { } file ? new Held(file) : null);

    public async Task<IHeldLock> AcquireAsync(ClusterLock name, CancellationToken ct)
    {
        for (var delay = 50; ; delay = Math.Min(2 * delay, 1000))
        {
            if (ExclusiveFile.TryOpen(PathOf(name)) is { } file) return new Held(file);
            await Task.Delay(delay, ct);
        }
    }

    private string PathOf(ClusterLock name) => $"{paths.SqliteFile}.{name.ToString().ToLowerInvariant()}.lock";

    private sealed class Held(FileStream file) : IHeldLock
    {
        // An open handle keeps its lock: nothing outside the process can take it away.
        public Task<bool> StillHeldAsync(CancellationToken ct) => Task.FromResult(true);

        public void Dispose() => file.Dispose();
    }
}
