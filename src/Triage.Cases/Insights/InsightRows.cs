namespace Triage.Cases.Insights;

/// <summary>Which closed cases an insight counts: verdict date range (inclusive days), line of business, model version.</summary>
public sealed record InsightFilter(DateOnly? From = null, DateOnly? To = null, string? Line = null, string? ModelVersion = null);

/// <summary>Verdict counts for one group. Hit rate = confirmed / (confirmed + not fraud); inconclusive is kept apart.</summary>
public sealed record HitRateRow(string Key, string Label, int Confirmed, int NotFraud, int Inconclusive)
{
    /// <summary>
    /// Below this many decided cases a row is flagged "too few to judge". Common practice (no source): the
    /// normal approximation behind quick readings is usually trusted from about 20 cases.
    /// </summary>
    public const int TooFewBelow = 20;

    public int Decided => Confirmed + NotFraud;
    public double? Rate => Decided == 0 ? null : (double)Confirmed / Decided;
    public Interval Interval => WilsonInterval.Of(Confirmed, Decided);
    public bool TooFew => Decided < TooFewBelow;
}

/// <summary>Verdicts recorded in one calendar month, with the amount saved on confirmed fraud.</summary>
public sealed record MonthRow(int Year, int Month, HitRateRow Counts, double AmountSaved)
{
    public string Label => $"{Year:D4}-{Month:D2}";
}

/// <summary>One score band: how often its decided cases were confirmed, next to what the model predicted for them.</summary>
public sealed record CalibrationRow(double BandLow, double BandHigh, int Decided, int Confirmed, double MeanPredicted)
{
    public double ObservedRate => Decided == 0 ? 0 : (double)Confirmed / Decided;
    public Interval Interval => WilsonInterval.Of(Confirmed, Decided);
    public string Label => $"{BandLow:0.0}–{BandHigh:0.0}";
}

/// <summary>Open cases by days since they opened; overdue = past their due date.</summary>
public sealed record QueueAgeRow(string Bucket, int Open, int Overdue);

/// <summary>
/// The audit sample's verdicts (claims drawn at random from below the threshold), the sampled cases still
/// open, and how many claims were scored below the threshold and not queued. The sample's hit rate
/// estimates the fraud rate among those claims; times their count, how many frauds the threshold let by.
/// </summary>
public sealed record AuditSampleRow(HitRateRow Sample, int StillOpen, int NotQueued)
{
    public double? MissedEstimate => Sample.Rate * NotQueued;
    public (double Low, double High) MissedInterval => (Sample.Interval.Low * NotQueued, Sample.Interval.High * NotQueued);
}
