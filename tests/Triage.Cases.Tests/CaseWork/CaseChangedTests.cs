using Microsoft.EntityFrameworkCore;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;

namespace Triage.Cases.Tests.CaseWork;

/// <summary>A page that loaded an older version of the case is refused, told what changed, and nothing is overwritten.</summary>
public sealed class CaseChangedTests
{
    private static readonly VerdictInput Fraud = new(VerdictOutcome.ConfirmedFraud, "Amount exaggerated", null, null);

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task A_verdict_on_a_case_reassigned_meanwhile_is_refused_naming_the_new_assignee(string provider)
    {
        await using var f = new CaseWorkFixture(provider);
        var id = await f.CaseAsync(f.Ines);
        var seen = (await f.OpenAsync(id, f.InesActor)).Stamp;
        await using (var db = f.Store.NewContext())
        {
            var c = await db.Cases.SingleAsync(x => x.Id == id);
            c.AssignTo(await db.Users.SingleAsync(u => u.Id == f.Tomas.Id), f.Lead, DateTime.UtcNow, "workload");
            await db.SaveChangesAsync();
        }
        var e = await Assert.ThrowsAsync<CaseChangedException>(() => f.WorkAsync(s => s.RecordVerdictAsync(id, Fraud, seen, f.InesActor)));
        Assert.Contains("changed after you opened it: mara reassigned it to tomas: workload", e.Message);
        Assert.Empty((await f.LoadAsync(id)).Verdicts);
    }

    [Fact]
    public async Task A_note_on_a_case_closed_meanwhile_is_refused_saying_who_recorded_which_verdict()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var leadSeen = (await f.OpenAsync(id, f.Lead)).Stamp;
        var inesSeen = (await f.OpenAsync(id, f.InesActor)).Stamp;
        await f.WorkAsync(s => s.RecordVerdictAsync(id, Fraud, inesSeen, f.InesActor));
        var e = await Assert.ThrowsAsync<CaseChangedException>(() => f.WorkAsync(s => s.AddNoteAsync(id, "late", leadSeen, f.Lead)));
        Assert.Contains("changed after you opened it: ines recorded the verdict ConfirmedFraud and closed the case", e.Message);
        Assert.Empty((await f.LoadAsync(id)).Notes);
    }

    [Fact]
    public async Task Two_tabs_of_the_same_investigator_do_not_overwrite_each_other()
    {
        await using var f = new CaseWorkFixture();
        var id = await f.CaseAsync(f.Ines);
        var first = await f.OpenAsync(id, f.InesActor);
        var check = first.Raising.SelectMany(d => d.Checks).Single();
        await f.WorkAsync(s => s.TickCheckAsync(id, check.Id, "from tab one", first.Stamp, f.InesActor));
        var e = await Assert.ThrowsAsync<CaseChangedException>(() =>
            f.WorkAsync(s => s.RecordVerdictAsync(id, Fraud, first.Stamp, f.InesActor)));
        Assert.Contains("ines ticked the check 'Ask for invoices'", e.Message);
        Assert.Equal(CaseStatus.InReview, (await f.LoadAsync(id)).Status);
    }
}
