using System.Globalization;
using CsvHelper;

namespace Triage.Cases.Insights;

/// <summary>Writes each insight table as CSV (invariant culture, rates as fractions, one header row).</summary>
public static class InsightsCsv
{
    public static void HitRates(TextWriter to, IEnumerable<HitRateRow> rows, string groupColumn) =>
        Write(to, rows.Select(r => new Dictionary<string, object?>
        {
            [groupColumn] = r.Label, ["key"] = r.Key, ["confirmed"] = r.Confirmed, ["not_fraud"] = r.NotFraud,
            ["inconclusive"] = r.Inconclusive, ["decided"] = r.Decided, ["hit_rate"] = r.Rate,
            ["wilson95_low"] = r.Interval.Low, ["wilson95_high"] = r.Interval.High, ["too_few"] = r.TooFew,
        }));

    public static void Months(TextWriter to, IEnumerable<MonthRow> rows) =>
        Write(to, rows.Select(r => new Dictionary<string, object?>
        {
            ["month"] = r.Label, ["confirmed"] = r.Counts.Confirmed, ["not_fraud"] = r.Counts.NotFraud,
            ["inconclusive"] = r.Counts.Inconclusive, ["hit_rate"] = r.Counts.Rate,
            ["wilson95_low"] = r.Counts.Interval.Low, ["wilson95_high"] = r.Counts.Interval.High, ["amount_saved"] = r.AmountSaved,
        }));

    public static void Calibration(TextWriter to, IEnumerable<CalibrationRow> rows) =>
        Write(to, rows.Select(r => new Dictionary<string, object?>
        {
            ["band_low"] = r.BandLow, ["band_high"] = r.BandHigh, ["decided"] = r.Decided, ["confirmed"] = r.Confirmed,
            ["mean_predicted"] = r.MeanPredicted, ["observed_rate"] = r.ObservedRate,
            ["wilson95_low"] = r.Interval.Low, ["wilson95_high"] = r.Interval.High,
        }));

    public static void QueueAge(TextWriter to, IEnumerable<QueueAgeRow> rows) =>
        Write(to, rows.Select(r => new Dictionary<string, object?> { ["age"] = r.Bucket, ["open"] = r.Open, ["overdue"] = r.Overdue }));

    private static void Write(TextWriter to, IEnumerable<Dictionary<string, object?>> rows)
    {
        using var csv = CsvWriter.Create(to, CsvWriterOptions.Default, true);
        var first = true;
        foreach (var row in rows)
        {
            if (first)
            {
                foreach (var name in row.Keys) csv.WriteField(name);
                csv.EndRecord();
                first = false;
            }
            foreach (var value in row.Values) csv.WriteField(Text(value));
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
