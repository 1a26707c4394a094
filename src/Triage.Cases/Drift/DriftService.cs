using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Cases.Store;
using Triage.Scoring.Drift;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;

namespace Triage.Cases.Drift;

/// <summary>
/// Population stability of the serving model's inputs and score: its training baseline against the claims
/// that arrived through scoring and were reported in the last <see cref="DriftOptions.WindowDays"/> days.
/// Recent claims are read once, streamed, and scored again by the serving model (so the score is compared
/// with that model's own training scores even for claims an earlier model scored on arrival).
/// Analysts, managers and admins may read.
/// </summary>
public sealed class DriftService(TriageDbContext db, ServingModels models, IOptions<DriftOptions> options, TimeProvider clock)
{
    private static readonly string[] Readers = [Roles.Analyst, Roles.Manager, Roles.Admin];

    public async Task<DriftReport> CurrentAsync(Actor actor, CancellationToken ct)
    {
        actor.Require("read model drift", Readers);
        var days = options.Value.WindowDays;
        var to = DateOnly.FromDateTime(clock.GetUtcNow().UtcDateTime);
        var from = to.AddDays(-(days - 1));
        DriftReport Empty(string? version, string why) => new(version, days, from, to, 0, 0, [], null, why);

        string version;
        ScoringModel model;
        try
        {
            var (serving, loaded) = await models.CurrentAsync(db, ct);
            (version, model) = (serving.Version, loaded);
        }
        catch (IntakeUnavailableException e) { return Empty(null, e.Message); }
        if (model.Drift is not { } baseline)
            return Empty(version, $"Model {version} was saved before drift baselines existed; retrain to get one.");

        var (start, end) = (from.ToDateTime(TimeOnly.MinValue, DateTimeKind.Utc), to.AddDays(1).ToDateTime(TimeOnly.MinValue, DateTimeKind.Utc));
        var tally = new DriftTally(model.Schema, baseline);
        var recent = db.Claims.AsNoTracking()
            .Where(c => c.ReportDate >= start && c.ReportDate < end && db.ClaimScores.Any(s => s.ClaimId == c.Id))
            .Select(c => c.FieldValuesJson)
            .AsAsyncEnumerable();
        await foreach (var json in recent.WithCancellation(ct))
        {
            var values = JsonSerializer.Deserialize<Dictionary<string, string?>>(json) ?? [];
            tally.Add(values, model.Probability(values));
        }
        if (tally.Claims == 0)
            return Empty(version, $"No scored claims were reported from {from:yyyy-MM-dd} to {to:yyyy-MM-dd}, so there is nothing to compare yet.");
        var fields = tally.Fields().Select(f => new FieldDriftRow(f.Name, DisplayName(model.Schema, f.Name), f)).ToList();
        return new DriftReport(version, days, from, to, tally.Claims, baseline.Rows, fields, tally.Score(), null, options.Value.MinimumClaims);
    }

    private static string DisplayName(ClaimSchema schema, string name) =>
        schema.Fields.FirstOrDefault(f => f.Name == name)?.DisplayName ?? schema.Derived.FirstOrDefault(d => d.Name == name)?.DisplayName ?? name;
}
