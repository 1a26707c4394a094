using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.TeamLead.TeamStore;

namespace Triage.Cases.Tests.TeamLead;

public sealed class AbsenceTests
{
    private static async Task<TestStore> StoreAsync()
    {
        var store = TestStore.Create();
        await using var db = await store.MigratedAsync();
        await AddPeopleAsync(db, (Person("ines"), []));
        db.Cases.AddRange(Build.Case(0.7), Build.Case(0.6));
        await db.SaveChangesAsync();
        return store;
    }

    [Fact]
    public async Task Marking_absent_and_back_is_audited_and_shown_on_the_workload()
    {
        await using var store = await StoreAsync();
        await Service<AbsenceService>(store).MarkAbsentAsync("id-ines", " training day ", Lead);
        var absent = (await Service<WorkloadService>(store).GetAsync(Lead)).People.Single();
        Assert.True(absent.User.IsAbsent);
        Assert.Equal(("training day", TestStore.Today.UtcDateTime, 0), (absent.User.AbsenceNote, absent.User.AbsentSince, absent.RemainingToday));

        await Service<AbsenceService>(store).MarkPresentAsync("id-ines", Lead);
        var back = (await Service<WorkloadService>(store).GetAsync(Lead)).People.Single();
        Assert.Equal((false, null, 5), (back.User.IsAbsent, back.User.AbsenceNote, back.RemainingToday));

        await using var db = store.NewContext();
        Assert.Equal([("user.absent", "ines: training day"), ("user.present", "ines")],
            (await db.AuditEvents.Where(a => a.What.StartsWith("user.")).OrderBy(a => a.Id).ToListAsync()).Select(a => (a.What, a.Detail)));
    }

    [Fact]
    public async Task Marking_twice_is_refused_and_only_leads_and_admins_may_mark()
    {
        await using var store = await StoreAsync();
        var s = Service<AbsenceService>(store);
        Assert.Contains("not marked absent", (await Assert.ThrowsAsync<DomainRuleException>(() => s.MarkPresentAsync("id-ines", Lead))).Message);
        await Assert.ThrowsAsync<AccessDeniedException>(() => s.MarkAbsentAsync("id-ines", null, Investigator("ines")));
        await Assert.ThrowsAsync<AccessDeniedException>(() => s.MarkAbsentAsync("id-ines", null, Manager));
        await s.MarkAbsentAsync("id-ines", null, Lead);
        Assert.Contains("already marked absent",
            (await Assert.ThrowsAsync<DomainRuleException>(() => Service<AbsenceService>(store).MarkAbsentAsync("id-ines", null, Lead))).Message);
    }

    // Our choice: absence is the lead's plan for the day, so an absent person's take next is refused with a
    // message rather than silently overriding it; they ask to be marked present.
    [Fact]
    public async Task Take_next_is_refused_while_absent_and_works_again_once_present()
    {
        await using var store = await StoreAsync();
        await Service<AbsenceService>(store).MarkAbsentAsync("id-ines", null, Lead);
        var e = await Assert.ThrowsAsync<DomainRuleException>(() => Service<TakeNextService>(store).TakeNextAsync(Investigator("ines")));
        Assert.Contains("marked absent", e.Message);
        Assert.Contains("ask a team lead to mark you present", e.Message);
        await Service<AbsenceService>(store).MarkPresentAsync("id-ines", Lead);
        Assert.NotNull(await Service<TakeNextService>(store).TakeNextAsync(Investigator("ines")));
    }
}
