using Triage.Scoring;

namespace Triage.Cases.Models;

public enum RetrainOutcome { Succeeded, Failed, Cancelled }

/// <summary>The retrain running now: who started it, with which trainer, how far it is.</summary>
public sealed record RetrainRun(Guid Id, string StartedBy, TrainerKind Trainer, DateTime StartedAt, string Stage, double Fraction, bool CancelRequested);

/// <summary>How the last retrain ended; Message says why when it did not succeed.</summary>
public sealed record RetrainResult(Guid Id, RetrainOutcome Outcome, string Message, string? Version, DateTime FinishedAt);

/// <summary>
/// One retrain at a time for this process: <see cref="TryBegin"/> takes the only slot, progress and
/// cancellation go through here, and pages listen to <see cref="Changed"/>.
/// </summary>
public sealed class RetrainState
{
    private readonly Lock _gate = new();
    private CancellationTokenSource? _cancel;

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

    internal void Report(Guid id, string stage, double fraction)
    {
        lock (_gate)
        {
            if (Current?.Id != id) return;
            Current = Current with { Stage = stage, Fraction = Math.Clamp(fraction, 0, 1) };
        }
        Changed?.Invoke();
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
        lock (_gate)
        {
            if (Current?.Id != result.Id) return;
            Current = null;
            Last = result;
            _cancel?.Dispose();
            _cancel = null;
        }
        Changed?.Invoke();
    }
}
