using System.Collections.Concurrent;
using System.Diagnostics;

namespace Triage.Bench.Load;

/// <summary>Every timed call per operation, and every failure with what went wrong.</summary>
internal sealed class Latencies
{
    private readonly ConcurrentDictionary<string, ConcurrentBag<double>> _ms = new();
    private readonly ConcurrentQueue<string> _failures = new();

    public IReadOnlyCollection<string> Failures => _failures;

    public async Task<T> TimeAsync<T>(string operation, Func<Task<T>> call)
    {
        var watch = Stopwatch.StartNew();
        try { return await call(); }
        finally { _ms.GetOrAdd(operation, _ => []).Add(watch.Elapsed.TotalMilliseconds); }
    }

    public void Fail(string operation, string why) => _failures.Enqueue($"{operation}: {why}");

    public void Print(TimeSpan wall)
    {
        Console.WriteLine($"{"operation",-26} {"calls",7} {"per s",8} {"p50 ms",8} {"p95 ms",8} {"p99 ms",8} {"max ms",8}");
        foreach (var (op, bag) in _ms.OrderBy(p => p.Key, StringComparer.Ordinal))
        {
            var sorted = bag.Order().ToArray();
            Console.WriteLine($"{op,-26} {sorted.Length,7} {sorted.Length / wall.TotalSeconds,8:0.0} {Pct(sorted, 0.50),8:0.0} {Pct(sorted, 0.95),8:0.0} {Pct(sorted, 0.99),8:0.0} {sorted[^1],8:0.0}");
        }
    }

    // Nearest-rank percentile.
    private static double Pct(double[] sorted, double q) => sorted[Math.Clamp((int)Math.Ceiling(q * sorted.Length) - 1, 0, sorted.Length - 1)];
}
