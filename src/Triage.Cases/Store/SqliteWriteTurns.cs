using System.Runtime.CompilerServices;
using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Diagnostics;

namespace Triage.Cases.Store;

/// <summary>
/// SQLite lets one transaction write at a time; the others retry every 150 ms until a 30 s timeout. Under a
/// stream of imports a short write (a sign-in, an API key's "last used") kept missing the gaps and failed after
/// 30 s (bench `load`: 500s, 30 s sign-ins). So in this process writers take turns here, in arrival order:
/// imports and take-next around their whole transaction, every other save through <see cref="SaveChangesTurns"/>.
/// PostgreSQL locks rows and needs none of this.
/// </summary>
public sealed class SqliteWriteTurns
{
    private readonly SemaphoreSlim _turn = new(1, 1);

    /// <summary>Waits for this process's write turn when the store is SQLite; dispose to hand it on.</summary>
    public async Task<IAsyncDisposable> TakeAsync(DbContext db, CancellationToken ct)
    {
        if (!db.Database.IsSqlite()) return NoTurn.Instance;
        await EnterAsync(ct);
        return new Turn(this);
    }

    internal Task EnterAsync(CancellationToken ct) => _turn.WaitAsync(ct);
    internal void Leave() => _turn.Release();

    private sealed class Turn(SqliteWriteTurns turns) : IAsyncDisposable
    {
        private int _done;
        public ValueTask DisposeAsync()
        {
            if (Interlocked.Exchange(ref _done, 1) == 0) turns.Leave();
            return ValueTask.CompletedTask;
        }
    }

    private sealed class NoTurn : IAsyncDisposable
    {
        public static readonly NoTurn Instance = new();
        public ValueTask DisposeAsync() => ValueTask.CompletedTask;
    }
}

/// <summary>
/// Every SaveChanges outside an explicit transaction waits for the SQLite write turn. Inside one (an import,
/// take next, a reassignment) the code that opened the transaction decides: imports and take next hold the turn already.
/// </summary>
public sealed class SaveChangesTurns(SqliteWriteTurns turns) : SaveChangesInterceptor
{
    // A context saves one change set at a time, so "this context holds the turn" is all there is to remember.
    private readonly ConditionalWeakTable<DbContext, object> _holding = new();

    public override async ValueTask<InterceptionResult<int>> SavingChangesAsync(DbContextEventData e, InterceptionResult<int> result, CancellationToken ct = default)
    {
        if (Needs(e.Context))
        {
            await turns.EnterAsync(ct);
            _holding.AddOrUpdate(e.Context!, this);
        }
        return result;
    }

    public override InterceptionResult<int> SavingChanges(DbContextEventData e, InterceptionResult<int> result)
    {
        if (Needs(e.Context))
        {
            turns.EnterAsync(CancellationToken.None).GetAwaiter().GetResult();
            _holding.AddOrUpdate(e.Context!, this);
        }
        return result;
    }

    public override ValueTask<int> SavedChangesAsync(SaveChangesCompletedEventData e, int result, CancellationToken ct = default) { Done(e.Context); return ValueTask.FromResult(result); }
    public override int SavedChanges(SaveChangesCompletedEventData e, int result) { Done(e.Context); return result; }
    public override Task SaveChangesFailedAsync(DbContextErrorEventData e, CancellationToken ct = default) { Done(e.Context); return Task.CompletedTask; }
    public override void SaveChangesFailed(DbContextErrorEventData e) => Done(e.Context);
    public override Task SaveChangesCanceledAsync(DbContextEventData e, CancellationToken ct = default) { Done(e.Context); return Task.CompletedTask; }
    public override void SaveChangesCanceled(DbContextEventData e) => Done(e.Context);
    // A concurrency conflict ends the save without the "failed" callback (found by the verdict races): hand on here too.
    public override ValueTask<InterceptionResult> ThrowingConcurrencyExceptionAsync(ConcurrencyExceptionEventData e, InterceptionResult result, CancellationToken ct = default) { Done(e.Context); return ValueTask.FromResult(result); }
    public override InterceptionResult ThrowingConcurrencyException(ConcurrencyExceptionEventData e, InterceptionResult result) { Done(e.Context); return result; }

    private bool Needs(DbContext? db) => db is not null && db.Database.CurrentTransaction is null && !_holding.TryGetValue(db, out _);

    private void Done(DbContext? db)
    {
        if (db is not null && _holding.Remove(db)) turns.Leave();
    }
}
