using Triage.Bench.Explain;
using Triage.Bench.Intake;
using Triage.Bench.Load;
using Triage.Bench.Queue;
using Triage.Bench.Retrain;

// Each benchmark lives in its own folder; add a case here for a new one.
var benchmarks = new Dictionary<string, Func<string[], Task<int>>>
{
    ["explain"] = _ => Task.FromResult(ExplainBenchmark.Run()),
    ["queue"] = async rest => { await QueueBenchmark.RunAsync(rest); return 0; },
    ["intake"] = IntakeBenchmark.RunAsync,
    ["load"] = LoadBenchmark.RunAsync,
    ["retrain"] = RetrainBenchmark.RunAsync,
};

if (args.Length == 0 || !benchmarks.TryGetValue(args[0], out var run))
{
    Console.Error.WriteLine($"usage: Triage.Bench <{string.Join("|", benchmarks.Keys)}> [options]");
    return 2;
}
return await run(args[1..]);
