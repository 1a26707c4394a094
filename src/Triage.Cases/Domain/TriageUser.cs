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

    /// <summary>Set by a team lead while the person is away: they get no cases from auto-balance, reassignment or take next.</summary>
    public DateTime? AbsentSince { get; private set; }
    public string? AbsenceNote { get; private set; }
    public bool IsAbsent => AbsentSince is not null;

    public void MarkAbsent(DateTime at, string? note)
    {
        if (IsAbsent) throw new DomainRuleException($"{DisplayName} is already marked absent.");
        AbsentSince = Claim.Utc(at);
        AbsenceNote = string.IsNullOrWhiteSpace(note) ? null : note.Trim();
        // Identity's optimistic token: a lead's change and a concurrent one on the same account cannot both land.
        ConcurrencyStamp = Guid.NewGuid().ToString();
    }

    public void MarkPresent()
    {
        if (!IsAbsent) throw new DomainRuleException($"{DisplayName} is not marked absent.");
        AbsentSince = null;
        AbsenceNote = null;
        ConcurrencyStamp = Guid.NewGuid().ToString();
    }

    public IReadOnlyList<string> LineList => Lines.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);

    public bool Covers(string line) => LineList.Contains(line, StringComparer.OrdinalIgnoreCase);
}
