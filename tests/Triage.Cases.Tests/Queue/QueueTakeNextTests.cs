using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.Store;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Queue;

public sealed class QueueTakeNextTests
{
    private static readonly string[] Lines = ["motor", "home", "travel"];

    private static Actor Investigator(TriageUser u) => new(u.Id, u.UserName!, new HashSet<string> { Roles.Investigator });

    private static async Task<TestStore> StoreWith(string provider, IEnumerable<TriageUser> users, int cases)
    {
        var store = TestStore.Create(provider);
        await using var db = await store.MigratedAsync();
        db.Users.AddRange(users);
        for (var i = 0; i < cases; i++) db.Cases.Add(Build.Case(0.2 + (i * 37 % cases) / (cases * 1.25), Lines[i % 3]));
        await db.SaveChangesAsync();
        return store;
    }

    private static async Task<TakenCase?> Take(TestStore store, Actor actor, CaseEvents? events = null)
    {
        await using var db = store.NewContext();
        return await new TakeNextService(db, new FixedClock(TestStore.Today), events ?? new CaseEvents(), store.Host.Services.GetRequiredService<SqliteWriteTurns>()).TakeNextAsync(actor);
    }

    [Fact]
    public async Task Taking_a_case_tells_open_pages_it_changed()
    {
        var tomas = Build.User("tomas", "travel");
        await using var store = await StoreWith("Sqlite", [tomas], 6);
        var events = new CaseEvents();
        var seen = new List<CaseChanged>();
        using var _ = events.Subscribe(seen.Add);

        var taken = await Take(store, Investigator(tomas), events);

        Assert.Equal(new CaseChanged(taken!.CaseId, "case.assigned"), Assert.Single(seen));
    }

    [Fact]
    public async Task Takes_the_riskiest_unassigned_case_on_the_investigators_lines_and_records_it()
    {
        var tomas = Build.User("tomas", "travel");
        await using var store = await StoreWith("Sqlite", [tomas], 30);
        var taken = await Take(store, Investigator(tomas));

        await using var db = store.NewContext();
        var expected = await db.Cases.Where(c => c.Line == "travel").OrderByDescending(c => c.Probability).FirstAsync();
        Assert.Equal(expected.Id, taken!.CaseId);
        var c = await db.Cases.Include(x => x.Assignments).Include(x => x.Audit).SingleAsync(x => x.Id == taken.CaseId);
        Assert.Equal((tomas.Id, CaseStatus.Assigned, "TOMAS"), (c.AssigneeId, c.Status, c.AssigneeName));
        Assert.Equal("take next", Assert.Single(c.Assignments).Reason);
        Assert.Contains(c.Audit, a => a is { What: "case.assigned", Who: "tomas" });
    }

    [Fact]
    public async Task Returns_nothing_when_no_unassigned_case_is_on_the_lines()
    {
        var tomas = Build.User("tomas", "travel");
        await using var store = await StoreWith("Sqlite", [tomas], 3);
        Assert.NotNull(await Take(store, Investigator(tomas)));
        Assert.Null(await Take(store, Investigator(tomas)));
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Eight_investigators_pressing_twenty_times_at_once_never_share_a_case(string provider)
    {
        var team = Enumerable.Range(0, 8).Select(i => Build.User($"inv{i}", "motor,home,travel")).ToList();
        // Fewer cases than presses, so the pool runs dry while everyone is still pressing.
        await using var store = await StoreWith(provider, team, 140);
        using var start = new Barrier(team.Count);
        var presses = team.Select(u => Task.Run(async () =>
        {
            start.SignalAndWait();
            var got = new List<TakenCase?>();
            for (var i = 0; i < 20; i++) got.Add(await Take(store, Investigator(u)));
            return (User: u, Got: got);
        })).ToArray();
        var results = await Task.WhenAll(presses);

        var taken = results.SelectMany(r => r.Got.OfType<TakenCase>().Select(t => (r.User.Id, t.CaseId))).ToList();
        Assert.Equal(taken.Count, taken.Select(t => t.CaseId).Distinct().Count());
        await using var db = store.NewContext();
        var assignments = await db.Set<Assignment>().ToListAsync();
        Assert.Equal(taken.Count, assignments.Count);
        Assert.All(taken, t => Assert.Contains(assignments, a => a.CaseId == t.CaseId && a.ToUserId == t.Id));
        // Every case that could be taken was taken: 140 cases, 160 presses.
        Assert.Equal(140, taken.Count);
        Assert.Equal(0, await db.Cases.CountAsync(c => c.AssigneeId == null));
    }
}
