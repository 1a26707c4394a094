using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Cases.Models;

/// <summary>The labelled rows a retrain learns from, and where they came from.</summary>
public sealed record TrainingSet(IReadOnlyList<LabelledClaim> Rows, int FromHistory, int FromVerdicts, int AuditSample, int InconclusiveLeftOut);

/// <summary>
/// Reads the labels from the store: claims settled in the history import (no case), plus closed cases by
/// their current verdict (confirmed fraud = 1, not fraud = 0; inconclusive left out). A case's features
/// are the values snapshotted when it was scored, laid over the claim as received (the snapshot holds
/// the model's inputs; the dates a derived field needs come from the claim). Audit-sample cases weigh
/// 1/selection probability (inverse-propensity weighting, Horvitz &amp; Thompson 1952).
/// </summary>
public sealed class TrainingSetReader(TriageDbContext db)
{
    public async Task<TrainingSet> ReadAsync(ClaimSchema schema, CancellationToken ct)
    {
        var fields = schema.Fields.Select(f => f.Name).ToHashSet();
        var rows = new List<LabelledClaim>();

        var history = db.Claims.AsNoTracking()
            .Where(c => c.Outcome == VerdictOutcome.ConfirmedFraud || c.Outcome == VerdictOutcome.NotFraud)
            .Where(c => !db.Cases.Any(k => k.ClaimId == c.Id))
            .Select(c => new { c.FieldValuesJson, c.Outcome });
        var settled = await history.ToListAsync(ct);
        // Parsing the JSON is most of the work: spread it over the cores, keeping the order.
        rows.AddRange(settled.AsParallel().AsOrdered().WithCancellation(ct)
            .Select(c => new LabelledClaim(Values(c.FieldValuesJson, null, fields), c.Outcome == VerdictOutcome.ConfirmedFraud)));
        var fromHistory = settled.Count;

        var closed = db.Cases.AsNoTracking()
            .Where(c => !c.IsOpen)
            .Select(c => new
            {
                c.Claim!.FieldValuesJson,
                c.ScoredValuesJson,
                c.IsAuditSample,
                c.SelectionProbability,
                Outcome = c.Verdicts.Where(v => v.SupersededAt == null).Select(v => (VerdictOutcome?)v.Outcome).FirstOrDefault(),
            });
        int fromVerdicts = 0, audit = 0, inconclusive = 0;
        await foreach (var c in closed.AsAsyncEnumerable().WithCancellation(ct))
        {
            if (c.Outcome is not (VerdictOutcome.ConfirmedFraud or VerdictOutcome.NotFraud)) { inconclusive++; continue; }
            var weight = 1.0;
            if (c.IsAuditSample)
            {
                if (!(c.SelectionProbability is > 0 and <= 1))
                    throw new InvalidDataException($"An audit-sample case has selection probability {c.SelectionProbability}; it must be above 0 and at most 1.");
                weight = 1 / c.SelectionProbability;
                audit++;
            }
            rows.Add(new LabelledClaim(Values(c.FieldValuesJson, c.ScoredValuesJson, fields), c.Outcome == VerdictOutcome.ConfirmedFraud, weight));
            fromVerdicts++;
        }
        return new TrainingSet(rows, fromHistory, fromVerdicts, audit, inconclusive);
    }

    private static Dictionary<string, string?> Values(string claimJson, string? snapshotJson, HashSet<string> fields)
    {
        var values = JsonSerializer.Deserialize<Dictionary<string, string?>>(claimJson) ?? [];
        if (snapshotJson is null) return values;
        foreach (var (k, v) in JsonSerializer.Deserialize<Dictionary<string, string?>>(snapshotJson) ?? [])
            if (fields.Contains(k)) values[k] = v;
        return values;
    }
}
