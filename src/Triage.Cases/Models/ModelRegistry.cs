using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Instances;
using Triage.Cases.Intake;
using Triage.Cases.Store;
using Triage.Scoring.Metrics;
using Triage.Scoring.Models;

namespace Triage.Cases.Models;

/// <summary>A version with its comparison against the champion of the day it was trained (when there was one).</summary>
public sealed record ModelEntry(ModelVersion Version, ComparisonResult? Comparison);

/// <summary>What a promotion or roll-back did.</summary>
public sealed record ServingChange(string Serving, string? Replaced, int CasesRescored);

/// <summary>
/// The model page's service: lists the versions, promotes a challenger or rolls back to a version that
/// served before. The switch is one transaction and the new model's file is loaded in full first, so the
/// next claim scored after the commit uses the whole new model and no request ever sees a mix. Other
/// instances read the same serving row; a notice tells them to load the new model's file right away.
/// </summary>
public sealed class ModelRegistry(TriageDbContext db, ServingModels serving, IInstanceNotices others, InstanceId self, TimeProvider clock)
{
    public static readonly string[] MayView = [Roles.Analyst, Roles.Admin, Roles.Manager];
    public static readonly string[] MayChange = [Roles.Analyst, Roles.Admin];
    private const int RescoreBatch = 200;

    public async Task<IReadOnlyList<ModelEntry>> ListAsync(Actor by, CancellationToken ct = default)
    {
        by.Require("see the model versions", MayView);
        var versions = await db.ModelVersions.AsNoTracking().Include(v => v.Changes).OrderByDescending(v => v.TrainedAt).ThenByDescending(v => v.Id).ToListAsync(ct);
        return [.. versions.Select(v => new ModelEntry(v, Comparison(v)))];
    }

    /// <summary>The latest retrain events (started, cancelled, failed, finished), newest first: why a retrain ended survives a restart.</summary>
    public async Task<IReadOnlyList<AuditEvent>> RecentActivityAsync(Actor by, int count = 8, CancellationToken ct = default)
    {
        by.Require("see the model versions", MayView);
        return await db.AuditEvents.AsNoTracking().Where(a => a.What.StartsWith("model.")).OrderByDescending(a => a.At).ThenByDescending(a => a.Id)
            .Take(count).ToListAsync(ct);
    }

    public Task<ServingChange> PromoteAsync(Actor by, string version, string note, bool rescoreOpenCases, CancellationToken ct = default) =>
        ChangeAsync(by, version, note, rescoreOpenCases, rollBack: false, ct);

    public Task<ServingChange> RollBackAsync(Actor by, string version, string note, bool rescoreOpenCases, CancellationToken ct = default) =>
        ChangeAsync(by, version, note, rescoreOpenCases, rollBack: true, ct);

    public static ComparisonResult? Comparison(ModelVersion v) =>
        v.ComparisonJson is null ? null : JsonSerializer.Deserialize<ComparisonResult>(v.ComparisonJson, RetrainRunner.Json);

    private async Task<ServingChange> ChangeAsync(Actor by, string version, string note, bool rescore, bool rollBack, CancellationToken ct)
    {
        by.Require(rollBack ? "roll back the model" : "promote a model", MayChange);
        var target = await db.ModelVersions.Include(v => v.Changes).SingleOrDefaultAsync(v => v.Version == version, ct)
            ?? throw new DomainRuleException($"There is no model version '{version}'.");
        ScoringModel model;
        try
        {
            model = serving.Load(target);
        }
        catch (Exception e) when (e is IOException or InvalidDataException)
        {
            throw new DomainRuleException($"Model {version} cannot serve: its file cannot be read ({e.Message}).");
        }

        var now = clock.GetUtcNow().UtcDateTime;
        await using var tx = await db.Database.BeginTransactionAsync(ct);
        var current = await db.ModelVersions.Include(v => v.Changes).SingleOrDefaultAsync(v => v.IsServing, ct);
        if (rollBack) target.RollBackTo(current, by, now, note);
        else target.Promote(current, by, now, note);
        // The database allows one serving row at any moment (a unique index), so the old champion's row is
        // written first and the new one's flag second, both inside the transaction readers do not see into.
        var flag = db.Entry(target).Property(v => v.IsServing);
        flag.CurrentValue = false;
        await db.SaveChangesAsync(ct);
        flag.CurrentValue = true;
        await db.SaveChangesAsync(ct);

        var rescored = rescore ? await RescoreOpenCasesAsync(model, by, now, ct) : 0;
        db.AuditEvents.Add(new AuditEvent(by.UserName, rollBack ? "model.rolled-back" : "model.promoted",
            $"{target.Version} ({target.Trainer}) serves" + (current is null ? "" : $", replacing {current.Version}") + $": {note.Trim()}" +
            (rescore ? $"; {rescored} open cases re-scored" : ""), now));
        await db.SaveChangesAsync(ct);
        await tx.CommitAsync(ct);
        await serving.RefreshAsync(db, ct);
        others.Send(new InstanceNotice(self.Value, rollBack ? "model.rolled-back" : "model.promoted", Model: target.Version));
        return new ServingChange(target.Version, current?.Version, rescored);
    }

    /// <summary>New scores and drivers for every open case, from the claim as received; old drivers are kept.</summary>
    private async Task<int> RescoreOpenCasesAsync(ScoringModel model, Actor by, DateTime now, CancellationToken ct)
    {
        var version = model.Metadata.Version;
        var ids = await db.Cases.Where(c => c.IsOpen && c.ModelVersion != version).OrderBy(c => c.Id).Select(c => c.Id).ToListAsync(ct);
        foreach (var batch in ids.Chunk(RescoreBatch))
        {
            var cases = await db.Cases.Include(c => c.Claim).Include(c => c.Drivers).Where(c => batch.Contains(c.Id)).ToListAsync(ct);
            var scored = CaseOpener.Score(model, cases.Select(c => (c.Claim!, c.Claim!.FieldValues())), ct);
            foreach (var (c, s) in cases.Zip(scored)) c.Rescore(s.Explanation, version, s.FeatureValues, by, now);
            await db.SaveChangesAsync(ct);
            db.ChangeTracker.Clear();
        }
        return ids.Count;
    }
}
