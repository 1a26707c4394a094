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
    /// <summary>Rows handed to the JSON parser at a time, on a worker, while the next rows are read from the store.</summary>
    private const int BatchRows = 2_000;

    public async Task<TrainingSet> ReadAsync(ClaimSchema schema, CancellationToken ct)
    {
        var fields = schema.Fields.Select(f => f.Name).ToHashSet();
        var json = new ClaimJsonReader(schema);
        var parsing = new List<Task<LabelledClaim[]>>();
        var batch = new List<Unparsed>(BatchRows);
        void Add(Unparsed row)
        {
            batch.Add(row);
            if (batch.Count < BatchRows) return;
            // Parsing the JSON is most of the work: it runs beside the store read, batches kept in order.
            var full = batch;
            parsing.Add(Task.Run(() => Parse(full, json, fields), ct));
            batch = new List<Unparsed>(BatchRows);
        }

        var history = db.Claims.AsNoTracking()
            .Where(c => c.Outcome == VerdictOutcome.ConfirmedFraud || c.Outcome == VerdictOutcome.NotFraud)
            .Where(c => !db.Cases.Any(k => k.ClaimId == c.Id))
            .Select(c => new { c.FieldValuesJson, c.Outcome });
        var fromHistory = 0;
        await foreach (var c in history.AsAsyncEnumerable().WithCancellation(ct))
        {
            Add(new Unparsed(c.FieldValuesJson, null, c.Outcome == VerdictOutcome.ConfirmedFraud, 1.0));
            fromHistory++;
        }

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
            Add(new Unparsed(c.FieldValuesJson, c.ScoredValuesJson, c.Outcome == VerdictOutcome.ConfirmedFraud, weight));
            fromVerdicts++;
        }
        parsing.Add(Task.FromResult(Parse(batch, json, fields)));
        var rows = new List<LabelledClaim>(fromHistory + fromVerdicts);
        foreach (var parsed in await Task.WhenAll(parsing)) rows.AddRange(parsed);
        return new TrainingSet(rows, fromHistory, fromVerdicts, audit, inconclusive);
    }

    private sealed record Unparsed(string ClaimJson, string? SnapshotJson, bool IsFraud, double Weight);

    private static LabelledClaim[] Parse(List<Unparsed> rows, ClaimJsonReader json, HashSet<string> fields)
    {
        var batch = new ClaimJsonReader.Batch();
        return [.. rows.Select(r => new LabelledClaim(Values(json, batch, r.ClaimJson, r.SnapshotJson, fields), r.IsFraud, r.Weight))];
    }

    private static Dictionary<string, string?> Values(ClaimJsonReader json, ClaimJsonReader.Batch batch, string claimJson, string? snapshotJson, HashSet<string> fields)
    {
        var values = json.Read(claimJson, batch);
        if (snapshotJson is null) return values;
        foreach (var (k, v) in json.Read(snapshotJson, batch))
            if (fields.Contains(k)) values[k] = v;
        return values;
    }
}
