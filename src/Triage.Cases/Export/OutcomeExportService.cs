using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Store;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;

namespace Triage.Cases.Export;

/// <summary>What an export wrote.</summary>
public sealed record ExportResult(int Rows, IReadOnlyList<ExportColumn> Columns);

/// <summary>
/// Confirmed outcomes for retraining: one row per closed case with a current verdict (an amended verdict
/// counts as its latest), with the feature values the case was scored on (its snapshot, never the claim as
/// it reads now). The feature columns are the union of the schemas of the model versions that scored the
/// selected cases, typed by those schemas. Analysts and admins may export; every export is audited with
/// who, the filter and the row count.
/// </summary>
public sealed class OutcomeExportService(TriageDbContext db, Pseudonyms pseudonyms, TriagePaths paths, TimeProvider clock)
{
    private static readonly string[] Exporters = [Roles.Analyst, Roles.Admin];

    /// <summary>How many rows the filter gives, for the page's preview.</summary>
    public Task<int> CountAsync(Actor actor, ExportFilter filter, CancellationToken ct)
    {
        actor.Require("export outcomes", Exporters);
        return Selected(filter).CountAsync(ct);
    }

    /// <summary>The lines and model versions closed cases carry, for the filter lists.</summary>
    public async Task<(IReadOnlyList<string> Lines, IReadOnlyList<string> ModelVersions)> FilterChoicesAsync(Actor actor, CancellationToken ct)
    {
        actor.Require("export outcomes", Exporters);
        var closed = db.Cases.Where(c => c.Status == CaseStatus.Closed);
        return (await closed.Select(c => c.Line).Distinct().OrderBy(l => l).ToListAsync(ct),
            await closed.Select(c => c.ModelVersion).Distinct().OrderBy(v => v).ToListAsync(ct));
    }

    /// <summary>Checks the role and works out the columns; nothing is written until the returned export is.</summary>
    public async Task<PreparedExport> PrepareAsync(Actor actor, ExportFilter filter, CancellationToken ct)
    {
        actor.Require("export outcomes", Exporters);
        var versions = await Selected(filter).Select(x => x.ModelVersion).Distinct().ToListAsync(ct);
        var columns = await ColumnsAsync(versions, ct);
        var clash = columns.FirstOrDefault(c => OutcomeColumns.Fixed(filter.Pseudonymise).Contains(c.Name));
        if (clash is not null)
            throw new InvalidDataException($"Schema field '{clash.Name}' has the name of one of the export's own columns; rename it in the schema.");
        return new PreparedExport(this, actor, filter, columns);
    }

    /// <summary>Ready to write: authorised, columns known.</summary>
    public sealed class PreparedExport(OutcomeExportService service, Actor actor, ExportFilter filter, IReadOnlyList<ExportColumn> columns)
    {
        public IReadOnlyList<ExportColumn> Columns => columns;

        /// <summary>Streams the rows to <paramref name="to"/> and audits the export (also one stopped part-way, with the rows written so far).</summary>
        public async Task<ExportResult> WriteAsync(ExportFormat format, Stream to, CancellationToken ct)
        {
            var rows = new CountedRows(service.RowsAsync(filter, columns, ct));
            try
            {
                if (format == ExportFormat.Csv)
                    await OutcomeCsv.WriteAsync(to, columns, filter.Pseudonymise, rows, ct);
                else if (to.CanSeek)
                    await OutcomeParquet.WriteAsync(to, columns, filter.Pseudonymise, rows, ct);
                else
                    await service.ParquetThroughTempFileAsync(to, columns, filter, rows, ct);
            }
            catch (Exception e)
            {
                await service.AuditAsync(actor, format, filter, rows.Count, $"stopped: {e.GetType().Name}");
                throw;
            }
            await service.AuditAsync(actor, format, filter, rows.Count, null);
            return new ExportResult(rows.Count, columns);
        }
    }

    private IQueryable<Selection> Selected(ExportFilter f)
    {
        var cases = db.Cases.AsNoTracking().Where(c => c.Status == CaseStatus.Closed);
        if (f.Line is { } line) cases = cases.Where(c => c.Line == line);
        if (f.ModelVersion is { } version) cases = cases.Where(c => c.ModelVersion == version);
        var verdicts = db.Verdicts.AsNoTracking().CurrentOnDays(f.From, f.To);
        if (!f.IncludeInconclusive) verdicts = verdicts.Where(v => v.Outcome != VerdictOutcome.Inconclusive);
        return cases.Join(verdicts, c => c.Id, v => v.CaseId, (c, v) => new Selection
        {
            CaseId = c.Id, ClaimNumber = c.ClaimNumber, Line = c.Line, OpenedAt = c.OpenedAt, VerdictAt = v.At, Outcome = v.Outcome,
            Probability = c.Probability, ModelVersion = c.ModelVersion, IsAuditSample = c.IsAuditSample,
            SelectionProbability = c.SelectionProbability, ScoredValuesJson = c.ScoredValuesJson,
        });
    }

    private async IAsyncEnumerable<OutcomeRow> RowsAsync(ExportFilter filter, IReadOnlyList<ExportColumn> columns,
        [System.Runtime.CompilerServices.EnumeratorCancellation] CancellationToken ct)
    {
        var identifiers = columns.Where(c => c.Identifier).Select(c => c.Name).ToList();
        var query = Selected(filter).OrderBy(x => x.VerdictAt).ThenBy(x => x.CaseId).AsAsyncEnumerable();
        await foreach (var x in query.WithCancellation(ct))
        {
            var values = JsonSerializer.Deserialize<Dictionary<string, string?>>(x.ScoredValuesJson) ?? [];
            var claimRef = x.ClaimNumber;
            if (filter.Pseudonymise)
            {
                claimRef = pseudonyms.Of(ClaimNumberField, x.ClaimNumber);
                foreach (var name in identifiers)
                    if (values.TryGetValue(name, out var v) && !string.IsNullOrEmpty(v)) values[name] = pseudonyms.Of(name, v);
            }
            yield return new OutcomeRow(claimRef, x.Line, x.OpenedAt, x.VerdictAt, OutcomeColumns.OutcomeWord(x.Outcome),
                OutcomeColumns.LabelOf(x.Outcome), x.Probability, x.ModelVersion, x.IsAuditSample, x.SelectionProbability, values);
        }
    }

    /// <summary>The key pseudonyms of claim numbers are made under, whatever the schema calls the field.</summary>
    private const string ClaimNumberField = "claim_number";

    /// <summary>
    /// Feature columns from the schemas of the given versions (read from their model files), in schema order,
    /// first version first; with no selected rows, the serving model's schema gives the header.
    /// </summary>
    private async Task<IReadOnlyList<ExportColumn>> ColumnsAsync(IReadOnlyList<string> versions, CancellationToken ct)
    {
        var registry = await db.ModelVersions.AsNoTracking()
            .Where(m => versions.Contains(m.Version) || m.IsServing)
            .OrderBy(m => m.TrainedAt).ToListAsync(ct);
        var used = registry.Where(m => versions.Contains(m.Version)).ToList();
        var missing = versions.Except(used.Select(m => m.Version)).ToList();
        if (missing.Count > 0)
            throw new InvalidDataException($"Model version(s) {string.Join(", ", missing)} scored some of these cases but are not in the model registry, so their columns cannot be typed.");
        var sources = used.Count > 0 ? used : registry.Where(m => m.IsServing).ToList();
        var columns = new List<ExportColumn>();
        foreach (var m in sources)
        {
            var schema = SchemaOf(m);
            foreach (var name in schema.FeatureNames.Where(n => columns.All(c => c.Name != n)))
                columns.Add(Column(schema, name));
        }
        return columns;
    }

    private ClaimSchema SchemaOf(ModelVersion m)
    {
        var path = Path.Combine(paths.DataFolder, m.FilePath);
        try { return ScoringModel.Load(path).Schema; }
        catch (Exception e) when (e is IOException or InvalidDataException)
        {
            throw new InvalidDataException($"The model file of version {m.Version} ('{path}') cannot be read, and the export needs its schema: {e.Message}", e);
        }
    }

    private static ExportColumn Column(ClaimSchema schema, string name)
    {
        var field = schema.Fields.FirstOrDefault(f => f.Name == name);
        var kind = field?.Type switch
        {
            FieldType.YesNo => ExportColumnKind.YesNo,
            FieldType.Category or FieldType.Text => ExportColumnKind.Category,
            _ => ExportColumnKind.Number,
        };
        return new ExportColumn(name, kind, field?.Identifier == true);
    }

    private async Task ParquetThroughTempFileAsync(Stream to, IReadOnlyList<ExportColumn> columns, ExportFilter filter,
        IAsyncEnumerable<OutcomeRow> rows, CancellationToken ct)
    {
        Directory.CreateDirectory(paths.DataFolder);
        var temp = Path.Combine(paths.DataFolder, $".export-{Guid.NewGuid():N}.parquet.tmp");
        await using var file = new FileStream(temp, FileMode.CreateNew, FileAccess.ReadWrite, FileShare.None, 64 * 1024, FileOptions.DeleteOnClose | FileOptions.Asynchronous);
        await OutcomeParquet.WriteAsync(file, columns, filter.Pseudonymise, rows, ct);
        file.Position = 0;
        await file.CopyToAsync(to, ct);
    }

    private async Task AuditAsync(Actor actor, ExportFormat format, ExportFilter filter, int rows, string? stopped)
    {
        var detail = $"{format.ToString().ToLowerInvariant()}, {filter.Describe()}: {rows} row(s)" + (stopped is null ? "" : $" ({stopped})");
        db.AuditEvents.Add(new AuditEvent(actor.UserName, "outcomes.exported", detail, clock.GetUtcNow().UtcDateTime));
        // Not the caller's token: an export cancelled part-way is still recorded.
        await db.SaveChangesAsync(CancellationToken.None);
    }

    /// <summary>Counts rows as the writer pulls them, so an export stopped part-way still audits how many left.</summary>
    private sealed class CountedRows(IAsyncEnumerable<OutcomeRow> inner) : IAsyncEnumerable<OutcomeRow>
    {
        public int Count { get; private set; }

        public async IAsyncEnumerator<OutcomeRow> GetAsyncEnumerator(CancellationToken ct = default)
        {
            await foreach (var r in inner.WithCancellation(ct))
            {
                Count++;
                yield return r;
            }
        }
    }

    // A class with init members (not a positional record) so EF can keep composing queries on it.
    private sealed class Selection
    {
        public int CaseId { get; init; }
        public string ClaimNumber { get; init; } = "";
        public string Line { get; init; } = "";
        public DateTime OpenedAt { get; init; }
        public DateTime VerdictAt { get; init; }
        public VerdictOutcome Outcome { get; init; }
        public double Probability { get; init; }
        public string ModelVersion { get; init; } = "";
        public bool IsAuditSample { get; init; }
        public double SelectionProbability { get; init; }
        public string ScoredValuesJson { get; init; } = "";
    }
}
