using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.TeamLead;

/// <summary>
/// One investigator's day in numbers. <see cref="TakenToday"/> counts the cases that came to the person
/// today (by take next, reassignment or auto-balance) and are still theirs, open or closed by them; a
/// case moved on to someone else the same day no longer uses their capacity.
/// </summary>
public sealed record PersonLoad(TriageUser User, int Open, int Overdue, int TakenToday, int ClosedThisWeek)
{
    /// <summary>What auto-balance may still hand them today: capacity minus cases taken today, never below zero.</summary>
    public int RemainingToday => User.IsAbsent ? 0 : Math.Max(0, User.DailyCapacity - TakenToday);
}

/// <summary>The grouped reads behind the team page and auto-balance: one query per figure, never one per person.</summary>
internal static class TeamLoad
{
    public static async Task<List<TriageUser>> InvestigatorsAsync(TriageDbContext db, CancellationToken ct) =>
        await (from u in db.Users
               join ur in db.UserRoles on u.Id equals ur.UserId
               join r in db.Roles on ur.RoleId equals r.Id
               where r.Name == Roles.Investigator
               orderby u.DisplayName
               select u).AsNoTracking().ToListAsync(ct);

    public static async Task<Dictionary<string, int>> TakenTodayAsync(TriageDbContext db, DateTime today, CancellationToken ct) =>
        await (from a in db.Set<Assignment>()
               where a.At >= today && a.ToUserId != null
               join c in db.Cases on a.CaseId equals c.Id
               where c.AssigneeId == a.ToUserId
               select new { UserId = a.ToUserId!, a.CaseId })
            .Distinct()
            .GroupBy(x => x.UserId)
            .Select(g => new { g.Key, Count = g.Count() })
            .ToDictionaryAsync(x => x.Key, x => x.Count, ct);

    public static async Task<List<PersonLoad>> LoadAsync(TriageDbContext db, TeamDay day, CancellationToken ct)
    {
        var people = await InvestigatorsAsync(db, ct);
        var open = await db.Cases.Where(c => c.IsOpen && c.AssigneeId != null)
            .GroupBy(c => c.AssigneeId!)
            .Select(g => new { g.Key, Open = g.Count(), Overdue = g.Sum(c => c.DueDate < day.Today ? 1 : 0) })
            .ToDictionaryAsync(x => x.Key, ct);
        var closed = await db.Cases.Where(c => c.ClosedAt >= day.WeekStart && c.AssigneeId != null)
            .GroupBy(c => c.AssigneeId!)
            .Select(g => new { g.Key, Count = g.Count() })
            .ToDictionaryAsync(x => x.Key, x => x.Count, ct);
        var taken = await TakenTodayAsync(db, day.Today, ct);
        return people.Select(u => new PersonLoad(u,
            open.TryGetValue(u.Id, out var o) ? o.Open : 0,
            o?.Overdue ?? 0,
            taken.GetValueOrDefault(u.Id),
            closed.GetValueOrDefault(u.Id))).ToList();
    }
}
