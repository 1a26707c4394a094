namespace Triage.Cli.Demo;

internal sealed record DemoOptions(int Seed = DemoScenario.DefaultSeed, int HistoryRows = DemoScenario.DefaultHistoryRows, int OpenRows = DemoScenario.DefaultOpenRows);

/// <summary>What the scenario.json file says about a run.</summary>
internal sealed record DemoScenario(string Insurer, int Seed, string AsOf, int HistoryRows, int OpenRows, double FraudRate)
{
    public const int DefaultSeed = 7;
    public const int DefaultHistoryRows = 24_000;
    public const int DefaultOpenRows = 900;
    public const string InsurerName = "Larchmere Mutual";

    /// <summary>Fixed "today" of the scenario; the app shifts every date by (today − AsOfDate) on load.</summary>
    public static readonly DateOnly AsOfDate = new(2026, 11, 30);
}

internal sealed record DemoDataSet(DemoScenario Scenario, IReadOnlyList<DemoClaim> History, IReadOnlyList<DemoClaim> Open);

/// <summary>Builds the whole scenario from one seed: closed history over three years, then the open claims of the last ten days.</summary>
internal static class DemoGenerator
{
    private const int HistoryDays = 1095;
    // History ends two weeks before the as-of date so every closed claim closes after it was reported.
    private const int HistoryGapDays = 15;
    private const int OpenDays = 10;

    public static DemoDataSet Generate(DemoOptions options)
    {
        if (options.HistoryRows < 1) throw new ArgumentOutOfRangeException(nameof(options), "--history-rows must be at least 1.");
        if (options.OpenRows < 1) throw new ArgumentOutOfRangeException(nameof(options), "--open-rows must be at least 1.");

        var random = new DemoRandom(options.Seed);
        var claims = new ClaimGenerator(random);
        var asOf = DemoScenario.AsOfDate;
        var firstHistoryDay = asOf.AddDays(-HistoryDays);
        var lastHistoryDay = asOf.AddDays(-HistoryGapDays);

        var history = new List<DemoClaim>(options.HistoryRows);
        for (var i = 0; i < options.HistoryRows; i++)
        {
            var report = firstHistoryDay.AddDays(random.Int(0, lastHistoryDay.DayNumber - firstHistoryDay.DayNumber));
            history.Add(Outcomes.Close(random, Outcomes.Plant(claims.Next(report)), asOf));
        }
        var open = new List<DemoClaim>(options.OpenRows);
        for (var i = 0; i < options.OpenRows; i++)
            open.Add(Outcomes.Plant(claims.Next(asOf.AddDays(-random.Int(0, OpenDays - 1)))));

        var (numberedHistory, numberedOpen) = ClaimNumbers.Assign(history, open);
        var fraudRate = Math.Round((double)history.Count(c => c.Fraud) / history.Count, 4);
        var scenario = new DemoScenario(DemoScenario.InsurerName, options.Seed, asOf.ToString("yyyy-MM-dd", System.Globalization.CultureInfo.InvariantCulture),
            history.Count, open.Count, fraudRate);
        return new DemoDataSet(scenario, numberedHistory, numberedOpen);
    }
}
