using Triage.Cases.Queue;
using Triage.Cases.Tests.Support;
using Xunit.Abstractions;
using static Triage.Cases.Tests.Concurrency.RaceCases;

namespace Triage.Cases.Tests.Concurrency;

/// <summary>Two investigators pressing "Take next" at the same moment never get the same case.</summary>
public sealed class TakeNextRaceTests(ITestOutputHelper output)
{
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Two_take_next_calls_never_hand_out_one_case_twice(string provider)
    {
        await using var store = TestStore.Create(provider);
        await AddTeamAsync(store);
        var takenBy = new Dictionary<int, string>();
        int bothServed = 0, oneToldNothingLeft = 0;
        for (var race = 0; race < Race.Count; race++)
        {
            // The pool is empty between races; it holds two cases for even races and one for odd ones.
            var pool = await AddAsync(store, race % 2 == 0 ? 2 : 1);
            TakenCase? forInes = null, forTomas = null;
            var (a, b) = await Race.RunAsync<TakeNextService, TakeNextService>(store,
                async s => forInes = await s.TakeNextAsync(Ines),
                async s => forTomas = await s.TakeNextAsync(Tomas));
            Assert.Null(a);
            Assert.Null(b);
            var taken = new[] { (Ines, forInes), (Tomas, forTomas) }.Where(t => t.Item2 is not null).ToList();
            Assert.Equal(pool.Count, taken.Count);
            Assert.Equal(pool.Select(p => p.Id).Order(), taken.Select(t => t.Item2!.CaseId).Order());
            foreach (var (who, t) in taken) takenBy.Add(t!.CaseId, who.UserId);
            if (pool.Count == 2) bothServed++;
            else oneToldNothingLeft++;
        }

        await using var db = store.NewContext();
        var stored = await LoadAsync(db);
        Assert.Equal(takenBy.Count, stored.Count);
        foreach (var (id, who) in takenBy)
        {
            var s = stored[id];
            Assert.Equal(who, s.AssigneeId);
            Assert.Equal(who, Assert.Single(s.Assignments).ToUserId);
            Assert.Single(s.Audit, x => x.What == "case.assigned");
        }
        output.WriteLine($"{provider}: {Race.Count} races; {bothServed} with two cases (each got a different one), {oneToldNothingLeft} with one (the other was told none is left)");
    }
}
