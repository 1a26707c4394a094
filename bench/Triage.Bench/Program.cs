using Triage.Bench.Explain;

// Each benchmark lives in its own folder; add a case here for a new one.
var benchmarks = new Dictionary<string, Func<int>>
{
    ["explain"] = ExplainBenchmark.Run,
};

if (args.Length == 0 || !benchmarks.TryGetValue(args[0], out var run))
{
    Console.Error.WriteLine($"usage: Triage.Bench <{string.Join("|", benchmarks.Keys)}>");
    return 2;
}
return run();
