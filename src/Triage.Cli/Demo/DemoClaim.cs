namespace Triage.Cli.Demo;

/// <summary>One generated claim with its hidden truth (planted mechanisms, outcome).</summary>
internal sealed record DemoClaim
{
    public string ClaimNumber { get; init; } = "";
    public required string PolicyNumber { get; init; }
    public required string ClaimantName { get; init; }
    public required string Line { get; init; }
    public required string Cause { get; init; }
    public required DateOnly PolicyStart { get; init; }
    public required DateOnly LossDate { get; init; }
    public required DateOnly ReportDate { get; init; }
    public int? LossHour { get; init; }
    public required decimal ClaimedAmount { get; init; }
    public required decimal PolicyLimit { get; init; }
    public int? CoverRaisedDays { get; init; }
    public int? AddressChangedDays { get; init; }
    public required int PriorClaims { get; init; }
    public bool? PoliceReport { get; init; }
    public string? Repairer { get; init; }
    public int? VehicleAge { get; init; }
    public required string Branch { get; init; }
    public string? AgeBand { get; init; }

    public IReadOnlyList<string> Planted { get; init; } = [];
    public bool Fraud { get; init; }
    public DateOnly? Closed { get; init; }

    public int DaysStartToLoss => LossDate.DayNumber - PolicyStart.DayNumber;
    public int DaysLossToReport => ReportDate.DayNumber - LossDate.DayNumber;

    /// <summary>As a consumer computes it from the CSV: double division of the two written numbers.</summary>
    public double AmountToLimit => (double)ClaimedAmount / (double)PolicyLimit;
}
