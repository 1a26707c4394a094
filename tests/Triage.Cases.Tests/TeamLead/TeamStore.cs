using Microsoft.AspNetCore.Identity;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Store;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.TeamLead;

/// <summary>A store with a small team (roles stored as Identity keeps them) and helpers to reach the team-lead services.</summary>
public static class TeamStore
{
    public static readonly Actor Lead = new("id-lead", "lead", new HashSet<string> { Roles.TeamLead });
    public static readonly Actor Manager = new("id-boss", "boss", new HashSet<string> { Roles.Manager });

    public static Actor Investigator(string name) => new($"id-{name}", name, new HashSet<string> { Roles.Investigator });

    /// <summary>Adds the users with the given roles (Investigator when none given).</summary>
    public static async Task AddPeopleAsync(TriageDbContext db, params (TriageUser User, string[] Roles)[] people)
    {
        var roles = new Dictionary<string, IdentityRole>();
        foreach (var name in Domain.Roles.All)
        {
            var role = await db.Roles.SingleOrDefaultAsync(r => r.Name == name)
                ?? db.Roles.Add(new IdentityRole(name) { NormalizedName = name.ToUpperInvariant() }).Entity;
            roles[name] = role;
        }
        foreach (var (user, userRoles) in people)
        {
            db.Users.Add(user);
            foreach (var r in userRoles.Length == 0 ? [Domain.Roles.Investigator] : userRoles)
                db.UserRoles.Add(new IdentityUserRole<string> { UserId = user.Id, RoleId = roles[r].Id });
        }
        await db.SaveChangesAsync();
    }

    public static TriageUser Person(string name, string lines = "motor,home", int capacity = 5)
    {
        var u = Build.User(name, lines);
        u.DailyCapacity = capacity;
        return u;
    }

    public static T Service<T>(TestStore store) where T : notnull =>
        store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<T>();
}
