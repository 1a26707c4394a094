namespace Triage.Cases.Domain;

/// <summary>Who is making a change: the user id for rules, the user name for the audit trail.</summary>
public sealed record Actor(string UserId, string UserName)
{
    public static readonly Actor System = new("system", "system");
}
