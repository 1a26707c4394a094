namespace Triage.Cases.TeamLead;

/// <summary>
/// The working day the team page counts in, in UTC like every date in the store: "today" starts at
/// midnight, "this week" on Monday (ISO 8601 weeks).
/// </summary>
public sealed record TeamDay(DateTime Today, DateTime WeekStart)
{
    public static TeamDay Of(DateTime utcNow)
    {
        var today = DateTime.SpecifyKind(utcNow.Date, DateTimeKind.Utc);
        var sinceMonday = ((int)today.DayOfWeek + 6) % 7;
        return new TeamDay(today, today.AddDays(-sinceMonday));
    }
}
