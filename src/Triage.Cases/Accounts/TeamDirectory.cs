using Microsoft.EntityFrameworkCore;
using Triage.Cases.Store;

namespace Triage.Cases.Accounts;

public sealed record TeamAccount(string UserName, string DisplayName, IReadOnlyList<string> Roles, IReadOnlyList<string> Lines);

/// <summary>Who is on the team and in which roles, read in one query.</summary>
public sealed class TeamDirectory(TriageDbContext db)
{
    public async Task<IReadOnlyList<TeamAccount>> ListAsync(CancellationToken ct = default)
    {
        var users = await db.Users.AsNoTracking().OrderBy(u => u.DisplayName).ToListAsync(ct);
        var roles = await (from ur in db.UserRoles
                           join r in db.Roles on ur.RoleId equals r.Id
                           select new { ur.UserId, r.Name }).AsNoTracking().ToListAsync(ct);
        var byUser = roles.ToLookup(r => r.UserId, r => r.Name!);
        return users.Select(u => new TeamAccount(u.UserName!, u.DisplayName, byUser[u.Id].Order().ToList(), u.LineList)).ToList();
    }
}
