using System.Diagnostics;

namespace Triage.Cases.Intake;

/// <summary>Adds up the time an import spends in each phase; scoring runs beside writing, so phases may overlap.</summary>
internal sealed class ImportClock
{
    public const int Checking = 0, Scoring = 1, Writing = 2;
    private readonly Stopwatch _total = Stopwatch.StartNew();
    private readonly long[] _ticks = new long[3];

    public T Time<T>(int phase, Func<T> work)
    {
        var start = Stopwatch.GetTimestamp();
        try { return work(); }
        finally { Interlocked.Add(ref _ticks[phase], Stopwatch.GetTimestamp() - start); }
    }

    public async Task<T> TimeAsync<T>(int phase, Func<Task<T>> work)
    {
        var start = Stopwatch.GetTimestamp();
        try { return await work(); }
        finally { Interlocked.Add(ref _ticks[phase], Stopwatch.GetTimestamp() - start); }
    }

    public async Task TimeAsync(int phase, Func<Task> work) => await TimeAsync(phase, async () => { await work(); return 0; });

    public ImportTimings Timings() => new(_total.Elapsed, Span(Checking), Span(Scoring), Span(Writing));

    private TimeSpan Span(int phase) => Stopwatch.GetElapsedTime(0, Interlocked.Read(ref _ticks[phase]));
}
