using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Concurrency;

/// <summary>
/// Two users' operations released at the same moment. Each side has its own scope (its own store context and
/// service instances), as two people on two circuits do; both wait at a gate, and the gate opens only once
/// both are waiting.
/// </summary>
public static class Race
{
    /// <summary>How many races of each kind a test runs.</summary>
    public const int Count = 500;

    /// <returns>What each side threw (null when it succeeded).</returns>
    public static async Task<(Exception? First, Exception? Second)> RunAsync<TFirst, TSecond>(TestStore store,
        Func<TFirst, Task> first, Func<TSecond, Task> second) where TFirst : notnull where TSecond : notnull
    {
        await using var a = store.Host.Services.CreateAsyncScope();
        await using var b = store.Host.Services.CreateAsyncScope();
        var (firstService, secondService) = (a.ServiceProvider.GetRequiredService<TFirst>(), b.ServiceProvider.GetRequiredService<TSecond>());
        using var waiting = new CountdownEvent(2);
        var gate = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        async Task<Exception?> Side(Func<Task> op)
        {
            waiting.Signal();
            await gate.Task;
            try { await op(); return null; }
            catch (Exception e) { return e; }
        }
        var one = Task.Run(() => Side(() => first(firstService)));
        var two = Task.Run(() => Side(() => second(secondService)));
        waiting.Wait();
        gate.SetResult();
        return (await one, await two);
    }
}
