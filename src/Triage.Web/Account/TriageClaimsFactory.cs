using System.Security.Claims;
using Claim = System.Security.Claims.Claim;
using Microsoft.AspNetCore.Identity;
using Microsoft.Extensions.Options;
using Triage.Cases.Domain;

namespace Triage.Web.Account;

/// <summary>Adds the display name to the sign-in cookie so pages need no database read to greet the user.</summary>
public sealed class TriageClaimsFactory(UserManager<TriageUser> users, RoleManager<IdentityRole> roles, IOptions<IdentityOptions> options)
    : UserClaimsPrincipalFactory<TriageUser, IdentityRole>(users, roles, options)
{
    public const string DisplayName = "triage:display_name";

    protected override async Task<ClaimsIdentity> GenerateClaimsAsync(TriageUser user)
    {
        var identity = await base.GenerateClaimsAsync(user);
        identity.AddClaim(new Claim(DisplayName, user.DisplayName));
        return identity;
    }
}
