using System.Security.Claims;
using Triage.Cases.Domain;

namespace Triage.Web.Account;

public static class PrincipalActor
{
    /// <summary>The signed-in person as the services see them (id, user name, roles from the cookie).</summary>
    public static Actor ToActor(this ClaimsPrincipal user)
    {
        var id = user.FindFirstValue(ClaimTypes.NameIdentifier)
            ?? throw new AccessDeniedException("Nobody is signed in.");
        var roles = user.FindAll(ClaimTypes.Role).Select(c => c.Value).ToHashSet();
        return new Actor(id, user.Identity?.Name ?? id, roles);
    }
}
