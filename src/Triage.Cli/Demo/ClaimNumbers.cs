namespace Triage.Cli.Demo;

/// <summary>Claim numbers run per report year in report-date order, like a claims system hands them out: LM-25-004211.</summary>
internal static class ClaimNumbers
{
    public static (List<DemoClaim> History, List<DemoClaim> Open) Assign(IReadOnlyList<DemoClaim> history, IReadOnlyList<DemoClaim> open)
    {
        var all = history.Select((c, i) => (Claim: c, Index: i, IsOpen: false))
            .Concat(open.Select((c, i) => (Claim: c, Index: history.Count + i, IsOpen: true)))
            .OrderBy(x => x.Claim.ReportDate.DayNumber).ThenBy(x => x.Index)
            .ToList();
        var next = new SortedDictionary<int, int>();
        var numberedHistory = new List<DemoClaim>(history.Count);
        var numberedOpen = new List<DemoClaim>(open.Count);
        foreach (var (claim, _, isOpen) in all)
        {
            var year = claim.ReportDate.Year % 100;
            next[year] = next.GetValueOrDefault(year) + 1;
            var numbered = claim with { ClaimNumber = $"LM-{year:00}-{next[year]:000000}" };
            (isOpen ? numberedOpen : numberedHistory).Add(numbered);
        }
        return (numberedHistory, numberedOpen);
    }
}
