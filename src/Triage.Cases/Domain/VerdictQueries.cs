namespace Triage.Cases.Domain;

public static class VerdictQueries
{
    /// <summary>Current (not superseded) verdicts recorded on the given UTC days, both ends included.</summary>
    public static IQueryable<Verdict> CurrentOnDays(this IQueryable<Verdict> verdicts, DateOnly? from, DateOnly? to)
    {
        verdicts = verdicts.Where(v => v.SupersededAt == null);
        if (from is { } f)
        {
            var start = f.ToDateTime(TimeOnly.MinValue, DateTimeKind.Utc);
            verdicts = verdicts.Where(v => v.At >= start);
        }
        if (to is { } t)
        {
            var end = t.AddDays(1).ToDateTime(TimeOnly.MinValue, DateTimeKind.Utc);
            verdicts = verdicts.Where(v => v.At < end);
        }
        return verdicts;
    }
}
