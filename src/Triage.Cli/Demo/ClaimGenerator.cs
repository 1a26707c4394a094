namespace Triage.Cli.Demo;

/// <summary>
/// Draws one claim at a time. Each planted mechanism first decides, with its own small chance,
/// whether it fires; the field is then drawn on the matching side of the trigger. Fields outside
/// the mechanisms (branch office, age band, day of month cover began) never touch the outcome.
/// The order of draws is part of the output: change it and every seed gives new data.
/// </summary>
internal sealed class ClaimGenerator(DemoRandom random)
{
    private static readonly (string, double)[] LineMix = [("motor", 0.50), ("home", 0.35), ("travel", 0.15)];

    private static readonly Dictionary<string, (string, double)[]> CauseMix = new()
    {
        ["motor"] = [("collision", 0.50), ("theft", 0.10), ("vandalism", 0.12), ("windscreen", 0.20), ("fire", 0.08)],
        ["home"] = [("fire", 0.10), ("water", 0.35), ("storm", 0.20), ("burglary", 0.15), ("accidental_damage", 0.20)],
        ["travel"] = [("baggage_loss", 0.30), ("medical", 0.35), ("cancellation", 0.25), ("theft", 0.10)],
    };

    private static readonly Dictionary<string, decimal[]> Limits = new()
    {
        ["motor"] = [8000m, 12000m, 15000m, 20000m, 25000m, 30000m, 40000m, 60000m],
        ["home"] = [25000m, 50000m, 75000m, 100000m, 150000m, 250000m],
        ["travel"] = [2000m, 3000m, 5000m, 10000m],
    };

    // Median claimed amount (EUR) per cause; amounts are lognormal around it.
    private static readonly Dictionary<string, double> MedianAmount = new()
    {
        ["collision"] = 2800, ["theft"] = 4500, ["vandalism"] = 900, ["windscreen"] = 420, ["fire"] = 6000,
        ["water"] = 3200, ["storm"] = 2400, ["burglary"] = 3800, ["accidental_damage"] = 650,
        ["baggage_loss"] = 700, ["medical"] = 1300, ["cancellation"] = 900,
    };

    private static readonly (string?, double)[] AgeBandMix =
        [("18-25", 0.10), ("26-35", 0.22), ("36-50", 0.31), ("51-65", 0.24), ("66+", 0.10), (null, 0.03)];

    private static readonly (int, double)[] PriorClaimsMix = [(0, 0.72), (1, 0.21), (2, 0.07)];

    // Hours 5-23 outside the night window, weighted towards the day.
    private static readonly (int, double)[] DayHours =
        [.. Enumerable.Range(5, 19).Select(h => (h, h is >= 8 and <= 20 ? 3.0 : 1.0))];

    public DemoClaim Next(DateOnly reportDate)
    {
        var line = random.PickWeighted(LineMix);
        var cause = random.PickWeighted(CauseMix[line]);
        var branch = random.Pick(DemoSchema.BranchOffices);
        var ageBand = random.PickWeighted(AgeBandMix);

        var lossDate = reportDate.AddDays(-(random.Chance(0.04) ? random.Int(31, 120) : Math.Min(30, random.Exponential(3.5))));
        var daysCovered = random.Chance(0.04) ? random.Int(0, 29) : 30 + Math.Min(2900, random.Exponential(650));
        var policyStart = lossDate.AddDays(-daysCovered);
        var lossHour = LossHour(cause);
        var limit = random.Pick(Limits[line]);
        var amount = Amount(cause, limit);

        return new DemoClaim
        {
            PolicyNumber = $"LMP-{random.Int(1_000_000, 9_999_999)}",
            ClaimantName = Names.Claimant(random),
            Line = line,
            Cause = cause,
            PolicyStart = policyStart,
            LossDate = lossDate,
            ReportDate = reportDate,
            LossHour = lossHour,
            ClaimedAmount = amount,
            PolicyLimit = limit,
            CoverRaisedDays = CoverRaised(daysCovered),
            AddressChangedDays = random.Chance(0.035) ? random.Int(0, 59)
                : random.Chance(0.15) ? 60 + Math.Min(3500, random.Exponential(700)) : null,
            PriorClaims = random.Chance(0.04) ? random.Int(3, 7) : random.PickWeighted(PriorClaimsMix),
            PoliceReport = PoliceReport(cause),
            Repairer = Repairer(line, cause),
            VehicleAge = line == "motor" ? (random.Chance(0.05) ? random.Int(15, 24) : Math.Min(14, random.Exponential(5.0))) : null,
            Branch = branch,
            AgeBand = ageBand,
        };
    }

    private int? LossHour(string cause)
    {
        // A cancellation has no moment of loss; other claimants sometimes cannot say.
        if (cause == "cancellation" || random.Chance(0.10)) return null;
        return random.Chance(0.05) ? random.Int(0, 4) : random.PickWeighted(DayHours);
    }

    private decimal Amount(string cause, decimal limit)
    {
        if (random.Chance(0.03))
            return Math.Round(limit * (decimal)random.Uniform(0.91, 1.0), 2);
        var drawn = MedianAmount[cause] * Math.Exp(0.9 * random.Normal());
        var cap = (double)limit * 0.9;
        // Large draws are re-spread below the cap so they do not pile up at 0.9 of the limit.
        var value = drawn <= cap ? drawn : cap * random.Uniform(0.3, 0.9);
        return Math.Max(25m, Math.Round((decimal)value, 2));
    }

    private int? CoverRaised(int daysCovered)
    {
        // Cover can only have been raised while the policy ran.
        if (random.Chance(0.035)) return random.Int(0, Math.Min(29, daysCovered));
        if (!random.Chance(0.20) || daysCovered < 30) return null;
        return Math.Min(daysCovered, 30 + random.Exponential(500));
    }

    private bool? PoliceReport(string cause) => cause switch
    {
        "theft" or "burglary" => !random.Chance(0.20),
        "vandalism" => !random.Chance(0.25),
        _ => null,
    };

    private string? Repairer(string line, string cause)
    {
        var named = line switch
        {
            "motor" => cause != "theft" && random.Chance(0.92),
            "home" => random.Chance(cause == "burglary" ? 0.30 : 0.75),
            _ => false,
        };
        if (!named) return null;
        return random.Chance(0.05)
            ? random.Pick(Mechanisms.HotspotRepairers)
            : random.Pick(OrdinaryRepairers);
    }

    private static readonly string[] OrdinaryRepairers =
        [.. DemoSchema.Repairers.Where(r => !Mechanisms.HotspotRepairers.Contains(r))];
}
