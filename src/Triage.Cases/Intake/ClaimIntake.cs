using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.FirstStart;
using Triage.Cases.Operations;
using Triage.Cases.Options;
using Triage.Cases.Queue;
using Triage.Cases.Store;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;

namespace Triage.Cases.Intake;

/// <summary>
/// Takes in a batch of claims, all or nothing. A first streaming pass checks every row against the
/// serving model's schema and the store (duplicates, claim numbers reused with other content); only
/// when no row is wrong does a second pass score, explain and store the new claims in batches inside
/// one transaction, opening cases for those at or above the queue threshold and for the audit sample. Memory is bounded by the
/// batch size, not the file size.
/// </summary>
public sealed class ClaimIntake(
    TriageDbContext db,
    ServingModels models,
    IOptions<IntakeOptions> options,
    IOptions<QueueOptions> queue,
    AuditSampler sampler,
    TimeProvider clock,
    ILogger<ClaimIntake> log,
    TriageMetrics metrics,
    SqliteWriteTurns turns)
{
    private const int Attempts = 3;

    public async Task<ImportReport> ImportAsync(ImportSource source, Actor by, IProgress<ImportProgress>? progress = null, CancellationToken ct = default)
    {
        by.Require("import claims", Roles.Analyst, Roles.Admin);
        var (version, model) = await models.CurrentAsync(db, ct);
        for (var attempt = 1; ; attempt++)
        {
            try
            {
                return await RunAsync(source, version.Version, model, by, progress, ct);
            }
            catch (Exception e) when (attempt < Attempts && StoreConflict.Is(e))
            {
                // Another import stored some of these claim numbers meanwhile: start again, and they read as duplicates or conflicts.
                db.ChangeTracker.Clear();
                log.LogInformation("Import of {Source} met a concurrent writer (attempt {Attempt}); retrying", source.Name, attempt);
            }
        }
    }

    private async Task<ImportReport> RunAsync(ImportSource source, string version, ScoringModel model, Actor by,
        IProgress<ImportProgress>? progress, CancellationToken ct)
    {
        var phases = new ImportClock();
        var check = await phases.TimeAsync(ImportClock.Checking, () => CheckAsync(source, model.Schema, progress, ct));
        var now = clock.GetUtcNow().UtcDateTime;
        if (check.Errors.Total > 0)
        {
            db.AuditEvents.Add(new AuditEvent(by.UserName, "claims.rejected", Trim($"{source.Name}: {check.Errors.Total} error(s) in {check.Rows} row(s); first: {check.Errors.Listed[0]}"), now));
            await db.SaveChangesAsync(ct);
            return new ImportReport(source.Name, check.Rows, 0, 0, 0, check.Errors.Total, check.Errors.Listed)
                { OverRowLimit = check.OverRowLimit, Timings = phases.Timings() };
        }
        var (stored, queued) = await StoreAsync(source, model, version, check, by, now, phases, progress, ct);
        metrics.ClaimsIngested(stored);
        var timings = phases.Timings();
        log.LogInformation("Import of {Source} took {Total}: checking {Checking}, scoring and explaining {Scoring}, writing {Writing}",
            source.Name, timings.Total, timings.Checking, timings.Scoring, timings.Writing);
        return new ImportReport(source.Name, check.Rows, stored, check.Duplicates.Count, queued, 0, []) { Timings = timings };
    }

    private sealed record CheckResult(int Rows, ErrorList Errors, HashSet<string> Duplicates, bool OverRowLimit);

    private async Task<CheckResult> CheckAsync(ImportSource source, ClaimSchema schema, IProgress<ImportProgress>? progress, CancellationToken ct)
    {
        var o = options.Value;
        var errors = new ErrorList(o.MaxErrors);
        var duplicates = new HashSet<string>(StringComparer.Ordinal);
        var firstRowOf = new Dictionary<string, int>(StringComparer.Ordinal);
        var pending = new List<(int Row, Dictionary<string, string?> Values)>(o.BatchSize);
        var rows = 0;
        var overLimit = false;
        await using var stream = source.Open();
        await foreach (var row in Read(source, stream, schema, ct))
        {
            if (row.Fatal) { errors.AddRange(row.Errors); break; }
            rows = row.Row;
            if (rows > source.MaxRows)
            {
                errors.Add(new RowError(rows, null, null, $"more than {source.MaxRows:N0} claims in one request; send at most {source.MaxRows:N0} at a time"));
                overLimit = true;
                break;
            }
            var values = row.Errors.Count > 0 ? null : ClaimRowRules.Check(schema, row, o.MaxFieldLength);
            var number = values?[schema.Roles.ClaimNumber];
            if (number is not null && !firstRowOf.TryAdd(number, row.Row))
                row.Errors.Add(new RowError(row.Row, schema.Roles.ClaimNumber, number, $"the claim number is also on row {firstRowOf[number]} of this input"));
            errors.AddRange(row.Errors);
            if (row.Errors.Count == 0) pending.Add((row.Row, values!));
            if (pending.Count >= o.BatchSize) await CompareWithStoreAsync(schema, pending, errors, duplicates, ct);
            if (rows % 1000 == 0) progress?.Report(new ImportProgress("Checking", Fraction(stream), rows));
        }
        await CompareWithStoreAsync(schema, pending, errors, duplicates, ct);
        if (rows == 0 && errors.Total == 0)
            errors.Add(new RowError(0, null, null, "the input holds no claims (only a header, or nothing)"));
        progress?.Report(new ImportProgress("Checking", 1, rows));
        return new CheckResult(rows, errors, duplicates, overLimit);
    }

    private async Task CompareWithStoreAsync(ClaimSchema schema, List<(int Row, Dictionary<string, string?> Values)> pending,
        ErrorList errors, HashSet<string> duplicates, CancellationToken ct)
    {
        if (pending.Count == 0) return;
        var numberField = schema.Roles.ClaimNumber;
        var byNumber = pending.ToDictionary(p => p.Values[numberField]!, StringComparer.Ordinal);
        var numbers = byNumber.Keys.ToList();
        var stored = await db.Claims.AsNoTracking().Where(c => numbers.Contains(c.ClaimNumber))
            .Select(c => new { c.ClaimNumber, c.FieldValuesJson }).ToListAsync(ct);
        foreach (var s in stored)
        {
            var (row, values) = byNumber[s.ClaimNumber];
            var storedValues = JsonSerializer.Deserialize<Dictionary<string, string?>>(s.FieldValuesJson) ?? [];
            var differ = SameContent.Differences(schema, storedValues, values);
            if (differ.Count == 0) duplicates.Add(s.ClaimNumber);
            else errors.Add(new RowError(row, numberField, s.ClaimNumber,
                $"a claim with this number is already stored with different content (differs in {string.Join(", ", differ)}); claims cannot be changed by sending them again"));
        }
        pending.Clear();
    }

    /// <summary>One new claim ready to write: its score and, when queued, the case its rules opened.</summary>
    private sealed record Built(Claim Claim, ClaimScore Score, Case? Opened);

    /// <remarks>
    /// A pipeline on one transaction: while one batch is written (the store takes one writer), the next is
    /// scored, explained and turned into cases on the other cores. At most three batches are in memory.
    /// </remarks>
    private async Task<(int Stored, int Queued)> StoreAsync(ImportSource source, ScoringModel model, string version, CheckResult check,
        Actor by, DateTime now, ImportClock phases, IProgress<ImportProgress>? progress, CancellationToken ct)
    {
        var o = options.Value;
        var (threshold, dueDays) = (queue.Value.Threshold, queue.Value.DueDays);
        var playbook = await db.PlaybookRules.AsNoTracking().ToListAsync(ct);
        var toStore = Math.Max(1, check.Rows - check.Duplicates.Count);
        int stored = 0, queued = 0;

        List<Built> Build(List<(Claim, IReadOnlyDictionary<string, string?>)> claims) =>
            [.. CaseOpener.Score(model, claims, ct).Select(s =>
            {
                var selection = sampler.Decide(s.Explanation.Probability);
                return new Built(s.Claim, ClaimScore.Record(s.Claim, s.Explanation, version, selection is not null, now),
                    selection is not null ? CaseOpener.Open(s, version, playbook, now, dueDays, by, selection) : null);
            })];

        await using var turn = await turns.TakeAsync(db, ct);
        await using var tx = await db.Database.BeginTransactionAsync(ct);
        using var writer = new ScoredClaimWriter(db);
        async Task WriteAsync(Task<List<Built>> scoring)
        {
            var built = await scoring;
            await phases.TimeAsync(ImportClock.Writing, async () =>
            {
                foreach (var b in built) await writer.WriteAsync(b.Claim, b.Score, b.Opened, ct);
            });
            stored += built.Count;
            queued += built.Count(b => b.Opened is not null);
            progress?.Report(new ImportProgress("Storing", Math.Min(1, (double)stored / toStore), stored));
        }

        var batch = new List<(Claim, IReadOnlyDictionary<string, string?>)>(o.BatchSize);
        Task<List<Built>>? previous = null;
        async Task HandOverAsync()
        {
            if (batch.Count == 0) return;
            var claims = batch;
            batch = new(o.BatchSize);
            var scored = previous;
            previous = Task.Run(() => phases.Time(ImportClock.Scoring, () => Build(claims)), ct);
            if (scored is not null) await WriteAsync(scored);
        }

        try
        {
            await using (var stream = source.Open())
                await foreach (var row in Read(source, stream, model.Schema, ct))
                {
                    var values = row.Fatal ? null : ClaimRowRules.Check(model.Schema, row, o.MaxFieldLength);
                    if (values is null || row.Errors.Count > 0)
                        throw new InvalidDataException($"{source.Name} changed while it was being imported (row {row.Row}); nothing was stored.");
                    if (check.Duplicates.Contains(values[model.Schema.Roles.ClaimNumber]!)) continue;
                    batch.Add((SeedClaims.ToClaim(model.Schema, values), values));
                    if (batch.Count >= o.BatchSize) await HandOverAsync();
                }
            await HandOverAsync();
            var last = previous;
            previous = null;
            if (last is not null) await WriteAsync(last);
        }
        finally
        {
            // A failed write leaves the next batch scoring: let it finish before the transaction goes.
            if (previous is not null) await previous.ContinueWith(_ => { }, TaskScheduler.Default);
        }
        await phases.TimeAsync(ImportClock.Writing, async () =>
        {
            db.AuditEvents.Add(new AuditEvent(by.UserName, "claims.imported",
                $"{source.Name}: {check.Rows} row(s), {stored} stored, {queued} queued (at or above {threshold:0.00} or drawn for the audit sample) by model {version}, {check.Duplicates.Count} duplicate(s)", now));
            await db.SaveChangesAsync(ct);
            await tx.CommitAsync(ct);
        });
        db.ChangeTracker.Clear();
        progress?.Report(new ImportProgress("Storing", 1, stored));
        log.LogInformation("Imported {Source}: {Stored} stored, {Queued} queued, {Duplicates} duplicates", source.Name, stored, queued, check.Duplicates.Count);
        return (stored, queued);
    }

    private IAsyncEnumerable<IncomingRow> Read(ImportSource source, Stream stream, ClaimSchema schema, CancellationToken ct) =>
        source.Format == ImportFormat.Json
            ? JsonClaimReader.ReadAsync(stream, schema, ct)
            : CsvClaimReader.ReadAsync(stream, schema, source.Delimiter, options.Value.MaxFieldLength, ct);

    private static double Fraction(Stream s) => s.CanSeek && s.Length > 0 ? Math.Min(1, (double)s.Position / s.Length) : 0;

    private static string Trim(string s) => s.Length <= 1000 ? s : s[..997] + "...";
}

/// <summary>Keeps the first <c>cap</c> errors and counts all of them.</summary>
internal sealed class ErrorList(int cap)
{
    private readonly List<RowError> _listed = [];
    public IReadOnlyList<RowError> Listed => _listed;
    public int Total { get; private set; }

    public void Add(RowError e)
    {
        Total++;
        if (_listed.Count < cap) _listed.Add(e);
    }

    public void AddRange(IEnumerable<RowError> errors)
    {
        foreach (var e in errors) Add(e);
    }
}
