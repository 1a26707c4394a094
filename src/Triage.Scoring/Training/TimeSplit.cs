using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Training;

/// <summary>Holds out the claims reported in the last N months before the latest report date.</summary>
public static class TimeSplit
{
    public static (List<int> Train, List<int> Holdout) Split(ClaimSchema schema, IReadOnlyList<LabelledClaim> rows, int holdoutMonths)
    {
        var field = schema.Roles.ReportDate;
        var dates = rows.Select((r, i) =>
        {
            try
            {
                return ClaimValues.Date(r.Values, field)
                    ?? throw new InvalidDataException($"Field '{field}' (report date) is empty; the time-based holdout needs it.");
            }
            catch (InvalidDataException e)
            {
                throw new InvalidDataException($"Training row {i + 1}: {e.Message}", e);
            }
        }).ToArray();
        var cutoff = dates.Max().AddMonths(-holdoutMonths);
        var train = new List<int>();
        var holdout = new List<int>();
        for (var i = 0; i < dates.Length; i++) (dates[i] > cutoff ? holdout : train).Add(i);
        return (train, holdout);
    }
}
