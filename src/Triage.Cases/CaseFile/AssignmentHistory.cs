using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.CaseFile;

/// <summary>One change of who holds a case, with people by display name. <see cref="From"/> or <see cref="To"/> is
/// null for the unassigned pool.</summary>
public sealed record AssignmentChange(DateTime At, string? From, string? To, string By, string? Reason);

/// <summary>A case's assignment history, newest first, as the case page lists it.</summary>
internal static class AssignmentHistory
{
    public static async Task<IReadOnlyList<AssignmentChange>> ForCaseAsync(TriageDbContext db, int caseId, CancellationToken ct)
    {
        var rows = await db.Set<Assignment>().AsNoTracking().Where(a => a.CaseId == caseId)
            .OrderByDescending(a => a.At).ThenByDescending(a => a.Id).ToListAsync(ct);
        if (rows.Count == 0) return [];
        // Holders are stored by account id, the mover by user name (it may be "system"): read both names in one query.
        var ids = rows.SelectMany(a => new[] { a.FromUserId, a.ToUserId }).OfType<string>().Distinct().ToList();
        var names = rows.Select(a => a.By).Distinct().ToList();
        var people = await db.Users.AsNoTracking().Where(u => ids.Contains(u.Id) || names.Contains(u.UserName!))
            .Select(u => new { u.Id, u.UserName, u.DisplayName }).ToListAsync(ct);
        var byId = people.ToDictionary(p => p.Id, p => p.DisplayName);
        var byName = people.Where(p => p.UserName is not null).ToDictionary(p => p.UserName!, p => p.DisplayName);
        // An account deleted since keeps its id in the history: show the id rather than nothing.
        string? Person(string? id) => id is null ? null : byId.GetValueOrDefault(id, id);
        return rows.Select(a => new AssignmentChange(a.At, Person(a.FromUserId), Person(a.ToUserId), byName.GetValueOrDefault(a.By, a.By), a.Reason))
            .ToList();
    }
}
