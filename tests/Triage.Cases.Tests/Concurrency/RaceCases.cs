using Microsoft.EntityFrameworkCore;
using Triage.Cases.CaseFile;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Store;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;
using static Triage.Cases.Tests.TeamLead.TeamStore;

namespace Triage.Cases.Tests.Concurrency;

/// <summary>A case as both contenders saw it just before a race.</summary>
public sealed record SeenCase(int Id, string ClaimNumber, Guid Version, long LastAuditId)
{
    public CaseStamp Stamp => new(Version, LastAuditId);
    public CaseSeen Seen => new(Id, Version);
}

/// <summary>One store with two investigators and many cases for the races, each race on a case of its own.</summary>
public static class RaceCases
{
    public static readonly Actor Ines = Investigator("ines");
    public static readonly Actor Tomas = Investigator("tomas");
    public static readonly Actor OtherLead = new("id-lead2", "lead2", new HashSet<string> { Roles.TeamLead });
    public static readonly VerdictInput NotFraud = new(VerdictOutcome.NotFraud, "Facts verified with documents", null, null);

    public static async Task AddTeamAsync(TestStore store)
    {
        await using var db = await store.MigratedAsync();
        await AddPeopleAsync(db, (Person("ines"), []), (Person("tomas"), []));
    }

    /// <summary>Adds <paramref name="count"/> cases, each brought to its starting state by <paramref name="prepare"/> (with Ines's account at hand).</summary>
    public static async Task<List<SeenCase>> AddAsync(TestStore store, int count, Action<Case, TriageUser>? prepare = null)
    {
        await using var db = store.NewContext();
        var ines = await db.Users.SingleAsync(u => u.Id == Ines.UserId);
        var cases = Enumerable.Range(0, count).Select(i => Build.Case(0.31 + 0.6 * i / count)).ToList();
        foreach (var c in cases) prepare?.Invoke(c, ines);
        db.Cases.AddRange(cases);
        await db.SaveChangesAsync();
        var ids = cases.Select(c => c.Id).ToList();
        var lastAudit = await db.AuditEvents.Where(a => a.CaseId != null && ids.Contains(a.CaseId.Value))
            .GroupBy(a => a.CaseId!.Value).Select(g => new { Id = g.Key, Last = g.Max(a => a.Id) }).ToDictionaryAsync(x => x.Id, x => x.Last);
        return [.. cases.Select(c => new SeenCase(c.Id, c.ClaimNumber, c.Version, lastAudit[c.Id]))];
    }

    /// <summary>Assigned to Ines and in her review.</summary>
    public static void InInesReview(Case c, TriageUser ines)
    {
        c.AssignTo(ines, Lead, Build.Now.AddDays(-1));
        c.StartReview(Ines, Build.Now.AddDays(-1));
    }

    /// <summary>Closed by Ines as not fraud.</summary>
    public static void ClosedByInes(Case c, TriageUser ines)
    {
        InInesReview(c, ines);
        c.RecordVerdict(NotFraud.Outcome, NotFraud.Reason, null, null, Ines, Build.Now.AddHours(-2));
    }

    /// <summary>The cases as stored after the races, with everything a check needs.</summary>
    public static Task<Dictionary<int, Case>> LoadAsync(TriageDbContext db) =>
        db.Cases.AsNoTracking().AsSplitQuery().Include(c => c.Claim).Include(c => c.Assignments).Include(c => c.Verdicts).Include(c => c.Audit)
            .ToDictionaryAsync(c => c.Id);

    /// <summary>A refusal the domain explains, never a raw store error.</summary>
    public static void AssertExplained(Exception e, params string[] expected)
    {
        Assert.IsNotType<DbUpdateConcurrencyException>(e);
        Assert.IsNotType<StaleCaseException>(e);
        Assert.True(expected.Any(x => e.Message.Contains(x, StringComparison.Ordinal)),
            $"{e.GetType().Name}: '{e.Message}' is not one of the explaining messages: {string.Join(" | ", expected)}\n{e}");
    }
}
