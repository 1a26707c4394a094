using Microsoft.AspNetCore.Identity;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.Accounts;

public sealed record NewAccount(string UserName, string DisplayName, string Email, IReadOnlyList<string> Roles,
    IReadOnlyList<string> Lines, int DailyCapacity);

/// <summary>Creates accounts and changes their roles; only an admin (or the operator's CLI, as system) may.</summary>
public sealed class UserAccounts(TriageDbContext db, UserManager<TriageUser> users, RoleManager<IdentityRole> roles, TimeProvider clock)
{
    public async Task<TriageUser> AddAsync(Actor actor, NewAccount account, string password, CancellationToken ct = default)
    {
        actor.Require("create accounts", Domain.Roles.Admin);
        var asked = Canonical(account.Roles);
        if (account.DailyCapacity is < 0 or > 100)
            throw new DomainRuleException($"Capacity must be between 0 and 100 cases a day (got {account.DailyCapacity}).");
        await EnsureRolesAsync();
        var user = new TriageUser
        {
            UserName = account.UserName.Trim(),
            Email = account.Email.Trim(),
            EmailConfirmed = true,
            DisplayName = account.DisplayName.Trim(),
            Lines = string.Join(',', account.Lines.Select(l => l.Trim().ToLowerInvariant())),
            DailyCapacity = account.DailyCapacity,
        };
        // Identity checks the user name, e-mail and password rules and says which one failed.
        Check(await users.CreateAsync(user, password), $"user '{account.UserName}'");
        Check(await users.AddToRolesAsync(user, asked), $"user '{account.UserName}'");
        await AuditAsync(actor, "user.added", $"{user.UserName}: {string.Join(',', asked)}", ct);
        return user;
    }

    public async Task SetRolesAsync(Actor actor, string userName, IReadOnlyList<string> newRoles, CancellationToken ct = default)
    {
        actor.Require("change roles", Domain.Roles.Admin);
        var asked = Canonical(newRoles);
        await EnsureRolesAsync();
        var user = await users.FindByNameAsync(userName) ?? throw new DomainRuleException($"No user named '{userName}'.");
        var current = await users.GetRolesAsync(user);
        Check(await users.RemoveFromRolesAsync(user, current.Except(asked)), $"user '{userName}'");
        Check(await users.AddToRolesAsync(user, asked.Except(current)), $"user '{userName}'");
        await AuditAsync(actor, "user.roles", $"{userName}: {string.Join(',', current.Order())} → {string.Join(',', asked.Order())}", ct);
    }

    /// <summary>The roles as the app spells them ("teamlead" → "TeamLead"); refuses none or an unknown one.</summary>
    private static List<string> Canonical(IReadOnlyList<string> asked)
    {
        if (asked.Count == 0) throw new DomainRuleException($"Give at least one role ({string.Join(", ", Domain.Roles.All)}).");
        var unknown = asked.Where(r => !Domain.Roles.All.Contains(r, StringComparer.OrdinalIgnoreCase)).ToList();
        if (unknown.Count > 0)
            throw new DomainRuleException($"Unknown role {string.Join(", ", unknown)}; roles are {string.Join(", ", Domain.Roles.All)}.");
        return Domain.Roles.All.Where(r => asked.Contains(r, StringComparer.OrdinalIgnoreCase)).ToList();
    }

    private async Task EnsureRolesAsync()
    {
        foreach (var role in Domain.Roles.All)
            if (!await roles.RoleExistsAsync(role)) Check(await roles.CreateAsync(new IdentityRole(role)), $"role {role}");
    }

    private async Task AuditAsync(Actor actor, string what, string detail, CancellationToken ct)
    {
        db.AuditEvents.Add(new AuditEvent(actor.UserName, what, detail, clock.GetUtcNow().UtcDateTime));
        await db.SaveChangesAsync(ct);
    }

    private static void Check(IdentityResult result, string what)
    {
        if (!result.Succeeded)
            throw new DomainRuleException($"{what}: {string.Join(" ", result.Errors.Select(e => e.Description))}");
    }
}
