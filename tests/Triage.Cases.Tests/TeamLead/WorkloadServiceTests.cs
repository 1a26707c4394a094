using Triage.Cases.Domain;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.TeamLead.TeamStore;

namespace Triage.Cases.Tests.TeamLead;

public sealed class WorkloadServiceTests
{
    private static readonly DateTime Now = Build.Now;

    private static Case Opened(double p, string line, int daysAgo, int dueDays = 10) =>
        Case.Open(Build.Claim(line), Build.Explanation(p), "v-test", new Dictionary<string, string?>(), [], Now.AddDays(-daysAgo), dueDays, Actor.System);

    [Fact]
    public void The_week_starts_on_monday_and_the_day_at_midnight_utc()
    {
        // 2027-03-15 is a Monday; 2027-03-21 the Sunday of the same ISO week.
        Assert.Equal(new TeamDay(new DateTime(2027, 3, 15), new DateTime(2027, 3, 15)), TeamDay.Of(new DateTime(2027, 3, 15, 9, 30, 0)));
        Assert.Equal(new DateTime(2027, 3, 15), TeamDay.Of(new DateTime(2027, 3, 21, 23, 59, 0)).WeekStart);
        Assert.Equal(new DateTime(2027, 3, 8), TeamDay.Of(new DateTime(2027, 3, 14, 8, 0, 0)).WeekStart);
    }

    [Fact]
    public async Task Counts_each_persons_day_and_the_pool_by_line_and_band()
    {
        await using var store = TestStore.Create();
        var ines = Person("ines", "motor,home", capacity: 4);
        var tomas = Person("tomas", "travel", capacity: 3);
        var kit = Person("kit", "motor");
        await using (var db = await store.MigratedAsync())
        {
            await AddPeopleAsync(db, (ines, []), (tomas, []), (kit, []), (Person("lead"), [Roles.TeamLead]));
            // Ines: two taken today (one overdue), one taken yesterday, one closed today, one closed last week;
            // one taken today and moved on to Kit counts for Kit, no longer for her.
            var todayA = Opened(0.9, "motor", 20); todayA.AssignTo(ines, Actor.System, Now);                 // overdue: due 10 days after opening
            var todayB = Opened(0.5, "home", 1); todayB.AssignTo(ines, Actor.System, Now);
            var yesterday = Opened(0.6, "motor", 3); yesterday.AssignTo(ines, Actor.System, Now.AddDays(-1));
            var closedNow = Opened(0.7, "motor", 4); closedNow.AssignTo(ines, Actor.System, Now.AddDays(-2));
            closedNow.StartReview(Build.As(ines), Now); closedNow.RecordVerdict(VerdictOutcome.NotFraud, "checked", null, null, Build.As(ines), Now);
            var closedBefore = Opened(0.7, "home", 9); closedBefore.AssignTo(ines, Actor.System, Now.AddDays(-5));
            closedBefore.StartReview(Build.As(ines), Now.AddDays(-3)); closedBefore.RecordVerdict(VerdictOutcome.NotFraud, "checked", null, null, Build.As(ines), Now.AddDays(-3));
            var moved = Opened(0.4, "motor", 1); moved.AssignTo(ines, Actor.System, Now); moved.AssignTo(kit, Actor.System, Now);
            db.Cases.AddRange(todayA, todayB, yesterday, closedNow, closedBefore, moved);
            // Pool: motor 85, 81, 45; home 12; travel 60, 100.
            db.Cases.AddRange(Opened(0.85, "motor", 1), Opened(0.81, "motor", 1), Opened(0.45, "motor", 1), Opened(0.12, "home", 1),
                Opened(0.60, "travel", 1), Opened(0.999, "travel", 1));
            await db.SaveChangesAsync();
        }

        var w = await Service<WorkloadService>(store).GetAsync(Lead);

        var i = w.People.Single(p => p.User.Id == ines.Id);
        Assert.Equal((3, 1, 2, 1, 2), (i.Open, i.Overdue, i.TakenToday, i.ClosedThisWeek, i.RemainingToday));
        var t = w.People.Single(p => p.User.Id == tomas.Id);
        Assert.Equal((0, 0, 0, 0, 3), (t.Open, t.Overdue, t.TakenToday, t.ClosedThisWeek, t.RemainingToday));
        var k = w.People.Single(p => p.User.Id == kit.Id);
        Assert.Equal((1, 1, 4), (k.Open, k.TakenToday, k.RemainingToday));
        Assert.DoesNotContain(w.People, p => p.User.UserName == "lead");
        Assert.Equal(["home", "motor", "travel"], w.Pool.Lines.Select(l => l.Line));
        Assert.Equal([2, 0, 1, 0, 0], w.Pool.Lines.Single(l => l.Line == "motor").ByBand);
        Assert.Equal([0, 0, 0, 0, 1], w.Pool.Lines.Single(l => l.Line == "home").ByBand);
        Assert.Equal([1, 1, 0, 0, 0], w.Pool.Lines.Single(l => l.Line == "travel").ByBand);
        Assert.Equal(6, w.Pool.Total);
        Assert.Equal(3, w.Pool.InBand(0));
    }

    [Fact]
    public async Task Lists_a_persons_cases_and_pages_the_pool_riskiest_first()
    {
        await using var store = TestStore.Create();
        var ines = Person("ines");
        await using (var db = await store.MigratedAsync())
        {
            await AddPeopleAsync(db, (ines, []));
            var held = Opened(0.3, "motor", 1); held.AssignTo(ines, Actor.System, Now);
            db.Cases.Add(held);
            db.Cases.AddRange(Enumerable.Range(0, 7).Select(k => Opened(0.2 + k * 0.1, k % 2 == 0 ? "motor" : "home", 1)));
            await db.SaveChangesAsync();
        }
        var s = Service<WorkloadService>(store);
        Assert.Single(await s.CasesOfAsync(Lead, ines.Id));
        var page = await s.PoolAsync(Manager, null, 1, 3);
        Assert.Equal(7, page.Total);
        Assert.Equal([50, 40, 30], page.Rows.Select(r => r.RiskScore));
        var motor = await s.PoolAsync(Lead, "motor", 0, 10);
        Assert.Equal(4, motor.Total);
        Assert.All(motor.Rows, r => Assert.Null(r.AssigneeName));
    }

    [Fact]
    public async Task Investigators_may_not_read_the_team_page()
    {
        await using var store = TestStore.Create();
        await (await store.MigratedAsync()).DisposeAsync();
        var s = Service<WorkloadService>(store);
        await Assert.ThrowsAsync<AccessDeniedException>(() => s.GetAsync(Investigator("ines")));
        await Assert.ThrowsAsync<AccessDeniedException>(() => s.PoolAsync(Investigator("ines"), null, 0, 10));
        await Assert.ThrowsAsync<AccessDeniedException>(() => s.CasesOfAsync(Investigator("ines"), "id-tomas"));
        Assert.Empty((await s.GetAsync(Manager)).People);
    }
}
