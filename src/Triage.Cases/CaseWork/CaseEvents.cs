using Triage.Cases.Instances;
using Triage.Cases.Operations;

namespace Triage.Cases.CaseWork;

/// <summary>Something happened to a case; <paramref name="What"/> is a short audit-style name such as "verdict.recorded".</summary>
public sealed record CaseChanged(int CaseId, string What);

/// <summary>
/// "Case N changed" notices, so every open page showing a case can reload it live. One per app (singleton);
/// handlers run on the publisher's thread and must not throw. Each change also goes to the other instances
/// sharing the store (<see cref="IInstanceNotices"/>; with SQLite there are none), whose listeners hand it
/// to their own pages through <see cref="PublishLocal"/>.
/// </summary>
public sealed class CaseEvents(IInstanceNotices? others = null, InstanceId? self = null, TriageMetrics? metrics = null)
{
    private readonly Lock _gate = new();
    private ImmutableHandlers _handlers = new([]);

    public void Publish(int caseId, string what)
    {
        metrics?.CaseChanged(what);
        PublishLocal(caseId, what);
        if (others is not null && self is not null) others.Send(new InstanceNotice(self.Value, what, CaseId: caseId));
    }

    /// <summary>Tells this instance's subscribers only: for a change another instance made and announced.</summary>
    public void PublishLocal(int caseId, string what)
    {
        var change = new CaseChanged(caseId, what);
        foreach (var h in _handlers.List) h(change);
    }

    /// <summary>Calls <paramref name="handler"/> for every change until the returned handle is disposed.</summary>
    public IDisposable Subscribe(Action<CaseChanged> handler)
    {
        lock (_gate) _handlers = new([.. _handlers.List, handler]);
        return new Subscription(() => { lock (_gate) _handlers = new([.. _handlers.List.Where(h => h != handler)]); });
    }

    // Replaced whole on every change, so Publish can iterate without taking the lock.
    private sealed record ImmutableHandlers(Action<CaseChanged>[] List);

    private sealed class Subscription(Action unsubscribe) : IDisposable
    {
        private int _done;
        public void Dispose()
        {
            if (Interlocked.Exchange(ref _done, 1) == 0) unsubscribe();
        }
    }
}
