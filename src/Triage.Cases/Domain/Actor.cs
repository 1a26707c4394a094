namespace Triage.Cases.Domain;

/// <summary>
/// Who is making a change: the user id for rules, the user name for the audit trail, the roles for
/// authorisation. Services check roles themselves (<see cref="Require"/>) rather than trusting the
/// UI to hide what a person may not do.
/// </summary>
public sealed record Actor(string UserId, string UserName, IReadOnlySet<string>? Roles = null)
{
    public static readonly Actor System = new("system", "system", new HashSet<string>(Domain.Roles.All));

    public bool IsIn(string role) => Roles?.Contains(role) == true;

    /// <summary>Throws <see cref="AccessDeniedException"/> unless the actor holds one of the roles.</summary>
    public void Require(string action, params string[] anyOf)
    {
        if (!anyOf.Any(IsIn))
            throw new AccessDeniedException($"{UserName} may not {action}: it needs the role {string.Join(" or ", anyOf)}.");
    }
}

/// <summary>An action refused because of who asked, not because of the state of the case.</summary>
public sealed class AccessDeniedException(string message) : Exception(message);
