using System.Runtime.ExceptionServices;

namespace Triage.Scoring;

/// <summary>Maps independent items on several cores, keeping their order; a single failure surfaces as itself.</summary>
internal static class ParallelMap
{
    public static TOut[] Ordered<TIn, TOut>(IEnumerable<TIn> items, Func<TIn, TOut> map)
    {
        var input = items as IReadOnlyList<TIn> ?? [.. items];
        var output = new TOut[input.Count];
        try { Parallel.For(0, input.Count, i => output[i] = map(input[i])); }
        catch (AggregateException e)
        {
            // Surface the failure itself (the first one recorded when several items fail), not a wrapper.
            ExceptionDispatchInfo.Throw(e.InnerExceptions[0]);
        }
        return output;
    }
}
