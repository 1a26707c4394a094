using Triage.Cases.Instances;
using Triage.Cases.Operations;
using Triage.Scoring;

namespace Triage.Cases.Models;

public enum RetrainOutcome { Succeeded, Failed, Cancelled }

/// <summary>The retrain running now: who started it, with which trainer, how far it is.</summary>
public sealed record RetrainRun(Guid Id, string StartedBy, TrainerKind Trainer, DateTime StartedAt, string Stage, double Fraction, bool CancelRequested);

/// <summary>How the last retrain ended; Message says why when it did not succeed.</summary>
public sealed record RetrainResult(Guid Id, RetrainOutcome Outcome, string Message, string? Version, DateTime FinishedAt);

/// <summary>
/// One retrain at a time for this process: <see cref="TryBegin"/> takes the only slot, progress and
/// cancellation go through here, and pages listen to <see cref="Changed"/>. The run also holds the lock
/// that keeps other instances from retraining (<see cref="Hold"/>) until it finishes.
/// </summary>
public sealed class RetrainState(TriageMetrics metrics)
{
    private readonly Lock _gate = new();
    private CancellationTokenSource? _cancel;
    private IHeldLock? _clusterLock;

    public RetrainRun? Current { get; private set; }
    public RetrainResult? Last { get; private set; }

    /// <summary>Raised (on the worker's thread) whenever the current run or the last result changes.</summary>
    public event Action? Changed;

    internal bool TryBegin(string startedBy, TrainerKind trainer, DateTime at, out RetrainRun run, out CancellationToken ct)
    {
        lock (_gate)
        {
            if (Current is not null)
            {
                run = Current;
                ct = default;
                return false;
            }
            _cancel = new CancellationTokenSource();
            run = Current = new RetrainRun(Guid.NewGuid(), startedBy, trainer, at, "Waiting to start", 0, false);
            ct = _cancel.Token;
        }
        Changed?.Invoke();
        return true;
    }

    /// <summary>Keeps the cross-instance lock for run <paramref name="id"/>; it is released when the run finishes.</summary>
    internal void Hold(Guid id, IHeldLock clusterLock)
    {
        lock (_gate)
        {
            if (Current?.Id == id && _clusterLock is null)
            {
                _clusterLock = clusterLock;
                return;
            }
        }
        clusterLock.Dispose();
    }

    /// <summary>Frees the slot of a run that never started (another instance is retraining): no result is recorded.</summary>
    internal void Abandon(Guid id)
    {
        IDisposable? held;
        lock (_gate)
        {
            if (Current?.Id != id) return;
            Current = null;
            held = Release();
        }
        held?.Dispose();
        Changed?.Invoke();
    }

    internal void Report(Guid id, string stage, double fraction)
    {
        lock (_gate)
        {
            if (Current?.Id != id) return;
            Current = Current with { Stage = stage, Fraction = Math.Clamp(fraction, 0, 1) };
        }
        Changed?.Invoke();
    }

    /// <summary>
    /// Whether run <paramref name="id"/> still holds the cross-instance lock: false once its database session has
    /// ended, after which another instance may have started a retrain of its own. A run that holds none has nothing
    /// to lose.
    /// </summary>
    internal async Task<bool> StillHoldsClusterLockAsync(Guid id, CancellationToken ct)
    {
        IHeldLock? held;
        lock (_gate)
        {
            if (Current?.Id != id) return false;
            held = _clusterLock;
        }
        return held is null || await held.StillHeldAsync(ct);
    }

    internal bool RequestCancel()
    {
        lock (_gate)
        {
            if (Current is null || _cancel is null) return false;
            Current = Current with { CancelRequested = true };
            _cancel.Cancel();
        }
        Changed?.Invoke();
        return true;
    }

    internal void Finish(RetrainResult result)
    {
        IDisposable? held;
        lock (_gate)
        {
            if (Current?.Id != result.Id) return;
            Current = null;
            Last = result;
            held = Release();
        }
        held?.Dispose();
        metrics.RetrainFinished(result.Outcome.ToString());
        Changed?.Invoke();
    }

    /// <returns>The cross-instance lock to dispose outside the gate (closing its connection may take a moment).</returns>
    private IHeldLock? Release()
    {
        _cancel?.Dispose();
        _cancel = null;
        var held = _clusterLock;
        _clusterLock = null;
        return held;
    }
}
