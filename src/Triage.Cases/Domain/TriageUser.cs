using Microsoft.AspNetCore.Identity;

namespace Triage.Cases.Domain;

public static class Roles
{
    public const string Investigator = nameof(Investigator);
    public const string TeamLead = nameof(TeamLead);
    public const string Analyst = nameof(Analyst);
    public const string Manager = nameof(Manager);
    public const string Admin = nameof(Admin);
    public static readonly IReadOnlyList<string> All = [Investigator, TeamLead, Analyst, Manager, Admin];
}

public sealed class TriageUser : IdentityUser
{
    public string DisplayName { get; set; } = "";
    /// <summary>Lines of business the person works, comma-separated (e.g. "motor,home").</summary>
    public string Lines { get; set; } = "";
    /// <summary>How many cases the person can take on in a day.</summary>
    public int DailyCapacity { get; set; }

    public IReadOnlyList<string> LineList => Lines.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);

    public bool Covers(string line) => LineList.Contains(line, StringComparer.OrdinalIgnoreCase);
}
