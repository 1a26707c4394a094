using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Queue;

/// <summary>Who may read which part of the queue and who may take a case, checked in the services themselves.</summary>
public sealed class QueueAccessTests : IAsyncLifetime
{
    private readonly TestStore _store = TestStore.Create();
    private readonly TriageUser _ines = Build.User("ines", "motor");
    private readonly TriageUser _tomas = Build.User("tomas", "motor");

    public async Task InitializeAsync()
    {
        await using var db = await _store.MigratedAsync();
        db.Users.AddRange(_ines, _tomas);
        for (var i = 0; i < 9; i++)
        {
            var c = Build.Case(0.4 + i / 100.0);
            if (i % 3 == 1) c.AssignTo(_ines, Actor.System, Build.Now);
            if (i % 3 == 2) c.AssignTo(_tomas, Actor.System, Build.Now);
            db.Cases.Add(c);
        }
        await db.SaveChangesAsync();
    }

    public async Task DisposeAsync() => await _store.DisposeAsync();

    private static Actor As(TriageUser u, params string[] roles) => new(u.Id, u.UserName!, roles.ToHashSet());

    private async Task<QueuePage> Read(Actor actor, QueueView view)
    {
        await using var db = _store.NewContext();
        return await new QueueService(db).GetPageAsync(actor, new QueueQuery(view));
    }

    [Fact]
    public async Task Someone_without_a_role_cannot_read_the_queue()
    {
        var e = await Assert.ThrowsAsync<AccessDeniedException>(() => Read(As(_ines), QueueView.Unassigned));
        Assert.Contains("read the queue", e.Message);
    }

    [Fact]
    public async Task An_investigator_sees_own_and_unassigned_cases_never_a_colleagues()
    {
        var all = await Read(As(_ines, Roles.Investigator), QueueView.AllOpen);
        Assert.Equal(6, all.Total);
        Assert.All(all.Rows, r => Assert.True(r.AssigneeName is null or "INES", r.AssigneeName));
        Assert.Equal(3, (await Read(As(_ines, Roles.Investigator), QueueView.Mine)).Total);
    }

    [Theory]
    [InlineData(Roles.TeamLead)]
    [InlineData(Roles.Manager)]
    [InlineData(Roles.Analyst)]
    [InlineData(Roles.Admin)]
    public async Task Leads_managers_analysts_and_admins_see_every_open_case(string role)
    {
        var page = await Read(new Actor("id-other", "other", new HashSet<string> { role }), QueueView.AllOpen);
        Assert.Equal(9, page.Total);
        Assert.Contains(page.Rows, r => r.AssigneeName == "TOMAS");
    }

    [Theory]
    [InlineData(Roles.TeamLead)]
    [InlineData(Roles.Analyst)]
    [InlineData(Roles.Manager)]
    [InlineData(Roles.Admin)]
    public async Task Only_investigators_take_the_next_case(string role)
    {
        await using var db = _store.NewContext();
        var service = new TakeNextService(db, new FixedClock(TestStore.Today), new Triage.Cases.CaseWork.CaseEvents(), new Triage.Cases.Store.SqliteWriteTurns());
        var e = await Assert.ThrowsAsync<AccessDeniedException>(() => service.TakeNextAsync(As(_ines, role)));
        Assert.Contains("take the next case", e.Message);
        Assert.NotNull(await service.TakeNextAsync(As(_ines, role, Roles.Investigator)));
    }
}
