using System.Globalization;
using CsvHelper;

namespace Triage.Cases.Insights;

/// <summary>Writes each insight table as CSV: one header row (also for an empty table), invariant numbers, rates as fractions.</summary>
public static class InsightsCsv
{
    public static void HitRates(TextWriter to, IEnumerable<HitRateRow> rows, string groupColumn) =>
        Write(to, [groupColumn, "key", "confirmed", "not_fraud", "inconclusive", "decided", "hit_rate", "wilson95_low", "wilson95_high", "too_few"],
            rows.Select(r => new object?[] { r.Label, r.Key, r.Confirmed, r.NotFraud, r.Inconclusive, r.Decided, r.Rate, r.Interval.Low, r.Interval.High, r.TooFew }));

    public static void Months(TextWriter to, IEnumerable<MonthRow> rows) =>
        Write(to, ["month", "confirmed", "not_fraud", "inconclusive", "hit_rate", "wilson95_low", "wilson95_high", "amount_saved"],
            rows.Select(r => new object?[]
            {
                r.Label, r.Counts.Confirmed, r.Counts.NotFraud, r.Counts.Inconclusive, r.Counts.Rate, r.Counts.Interval.Low, r.Counts.Interval.High, r.AmountSaved,
            }));

    public static void Calibration(TextWriter to, IEnumerable<CalibrationRow> rows) =>
        Write(to, ["band_low", "band_high", "decided", "confirmed", "mean_predicted", "observed_rate", "wilson95_low", "wilson95_high"],
            rows.Select(r => new object?[] { r.BandLow, r.BandHigh, r.Decided, r.Confirmed, r.MeanPredicted, r.ObservedRate, r.Interval.Low, r.Interval.High }));

    public static void QueueAge(TextWriter to, IEnumerable<QueueAgeRow> rows) =>
        Write(to, ["age", "open", "overdue"], rows.Select(r => new object?[] { r.Bucket, r.Open, r.Overdue }));

    public static void AuditSample(TextWriter to, AuditSampleRow r) =>
        Write(to, ["confirmed", "not_fraud", "inconclusive", "still_open", "fraud_rate", "wilson95_low", "wilson95_high", "not_queued_claims", "missed_estimate", "missed_low", "missed_high"],
            [[r.Sample.Confirmed, r.Sample.NotFraud, r.Sample.Inconclusive, r.StillOpen, r.Sample.Rate, r.Sample.Interval.Low, r.Sample.Interval.High,
              r.NotQueued, r.MissedEstimate, r.MissedInterval.Low, r.MissedInterval.High]]);

    private static void Write(TextWriter to, string[] header, IEnumerable<object?[]> rows)
    {
        using var csv = CsvWriter.Create(to, CsvWriterOptions.Default, true);
        foreach (var name in header) csv.WriteField(name);
        csv.EndRecord();
        foreach (var row in rows)
        {
            foreach (var value in row) csv.WriteField(Text(value));
            csv.EndRecord();
        }
        csv.Flush();
    }

    private static string Text(object? value) => value switch
    {
        null => "",
        double d => d.ToString("0.######", CultureInfo.InvariantCulture),
        bool b => b ? "true" : "false",
        IFormattable f => f.ToString(null, CultureInfo.InvariantCulture),
        _ => value.ToString() ?? "",
    };
}
