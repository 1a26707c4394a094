using System.Diagnostics.Metrics;

namespace Triage.Cases.Operations;

/// <summary>
/// The app's own counters on the "Triage" meter, for OpenTelemetry or <c>dotnet-counters</c> to read:
/// claims taken in, case changes by kind (a closed case is "verdict.recorded"), retrains by outcome.
/// </summary>
public sealed class TriageMetrics
{
    public const string MeterName = "Triage";

    private readonly Counter<long> _claimsIngested;
    private readonly Counter<long> _caseChanges;
    private readonly Counter<long> _retrains;

    public TriageMetrics(IMeterFactory meters)
    {
        var meter = meters.Create(MeterName);
        _claimsIngested = meter.CreateCounter<long>("triage.claims.ingested", "{claim}", "Claims stored by intake (upload, API or command line)");
        _caseChanges = meter.CreateCounter<long>("triage.case.changes", "{change}", "Changes to cases, by kind");
        _retrains = meter.CreateCounter<long>("triage.retrain.runs", "{run}", "Finished retrains, by outcome");
    }

    public void ClaimsIngested(int count)
    {
        if (count > 0) _claimsIngested.Add(count);
    }

    public void CaseChanged(string what) => _caseChanges.Add(1, new KeyValuePair<string, object?>("what", what));

    public void RetrainFinished(string outcome) => _retrains.Add(1, new KeyValuePair<string, object?>("outcome", outcome));
}
