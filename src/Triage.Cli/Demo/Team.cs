namespace Triage.Cli.Demo;

internal sealed record TeamMember(string UserName, string DisplayName, string Email, IReadOnlyList<string> Roles, IReadOnlyList<string> Lines, int DailyCapacity);

internal sealed record TeamFile(IReadOnlyList<TeamMember> People);

/// <summary>The invented investigation team of Larchmere Mutual. Fixed, not drawn: the same people for every seed.</summary>
internal static class Team
{
    private const string Domain = "larchmere.example";

    public static TeamFile Build() => new(
    [
        Person("Maren Quillfeather", ["Investigator"], ["motor"], 9),
        Person("Tobin Ashcombe", ["Investigator"], ["motor"], 8),
        Person("Ilse Marrowgate", ["Investigator"], ["motor", "home"], 7),
        Person("Declan Fenwhistle", ["Investigator"], ["home"], 8),
        Person("Rosalind Copperthwaite", ["Investigator"], ["home"], 6),
        Person("Jarek Nettlefold", ["Investigator"], ["home", "travel"], 7),
        Person("Wenna Sorrelmere", ["Investigator"], ["travel"], 10),
        Person("Lorcan Emberstile", ["Investigator"], ["motor", "home", "travel"], 5),
        Person("Cerys Brindlehythe", ["TeamLead", "Investigator"], ["motor", "travel"], 3),
        Person("Piet Gorsewick", ["TeamLead"], ["home", "travel"], 0),
        Person("Anouk Yarrowtor", ["Analyst"], [], 0),
        Person("Hollis Umbershaw", ["Manager"], [], 0),
        Person("Sten Lanternbrook", ["Admin", "Analyst"], [], 0),
    ]);

    private static TeamMember Person(string displayName, string[] roles, string[] lines, int capacity)
    {
        var userName = displayName.ToLowerInvariant().Replace(' ', '.');
        return new TeamMember(userName, displayName, $"{userName}@{Domain}", roles, lines, capacity);
    }
}
