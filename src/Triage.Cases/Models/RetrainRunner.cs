using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Logging;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Intake;
using Triage.Cases.Store;
using Triage.Scoring;
using Triage.Scoring.Features;
using Triage.Scoring.Metrics;
using Triage.Scoring.Models;
using Triage.Scoring.Training;

namespace Triage.Cases.Models;

/// <summary>A retrain to run: who asked, with which settings; Id ties it to <see cref="RetrainState"/>.</summary>
public sealed record RetrainJob(Guid Id, Actor By, ScoringOptions Settings, CancellationToken Cancel);

/// <summary>
/// Does one retrain: reads the labels, trains, compares the result with the champion on the same
/// time-based holdout, writes the model file and registers a challenger. Nothing serves differently
/// afterwards; on a failure or cancellation the file is removed, nothing is registered, and the audit
/// trail and <see cref="RetrainState"/> say why.
/// </summary>
public sealed class RetrainRunner(TriageDbContext db, ModelTrainer trainer, ServingModels serving, TriagePaths paths,
    RetrainState state, TimeProvider clock, ILogger<RetrainRunner> log)
{
    public static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        NumberHandling = System.Text.Json.Serialization.JsonNumberHandling.AllowNamedFloatingPointLiterals,
        Converters = { new System.Text.Json.Serialization.JsonStringEnumConverter() },
    };

    public async Task<RetrainResult> RunAsync(RetrainJob job, CancellationToken ct)
    {
        using var linked = CancellationTokenSource.CreateLinkedTokenSource(ct, job.Cancel);
        var token = linked.Token;
        string? file = null;
        var registered = false;
        var stage = "starting";
        void Report(string s, double f)
        {
            stage = s;
            state.Report(job.Id, s, f);
        }
        RetrainResult result;
        try
        {
            Report("Reading labelled cases", 0.02);
            var (championVersion, champion) = await serving.CurrentAsync(db, token);
            var schema = champion.Schema;
            var set = await new TrainingSetReader(db).ReadAsync(schema, token);
            var version = await NextVersionAsync(token);
            log.LogInformation("Retrain {Version}: {Rows} labelled rows ({History} history, {Verdicts} verdicts, {Audit} audit sample)",
                version, set.Rows.Count, set.FromHistory, set.FromVerdicts, set.AuditSample);

            if (set.Rows.Count == 0) throw new InvalidDataException("There are no labelled claims to train on.");
            // The champion's scorecard on the holdout needs nothing from the challenger: it is made while the challenger is fitted.
            var (_, holdoutIndex) = TimeSplit.Split(schema, set.Rows, job.Settings.HoldoutMonths);
            var holdout = holdoutIndex.Select(i => set.Rows[i]).ToList();
            var from = holdout.Select(r => ClaimValues.Date(r.Values, schema.Roles.ReportDate)).Min();
            var k = await DailyCapacityAsync(token);
            var championCard = Task.Run(() => ModelComparison.Score(champion, holdout, k, token), token);

            var progress = new SyncProgress<TrainingProgress>(p => Report(p.Stage, 0.05 + 0.7 * p.Fraction));
            var request = new TrainingRequest(version, job.Settings.Trainer, job.By.UserName, job.Settings);
            ScoringModel model;
            try
            {
                model = await Task.Run(() => trainer.Train(schema, set.Rows, request, progress, token), token);
                token.ThrowIfCancellationRequested();
            }
            catch
            {
                // Leave nothing running behind a failed or cancelled training; its own failure is the one to report.
                await championCard.ContinueWith(_ => { }, CancellationToken.None, TaskContinuationOptions.None, TaskScheduler.Default);
                throw;
            }

            Report("Comparing with the serving model", 0.8);
            var comparison = await Task.Run(async () => ModelComparison.Compare(await championCard, model, holdout, k, from, token), token);
            token.ThrowIfCancellationRequested();

            Report("Saving the challenger", 0.95);
            Directory.CreateDirectory(paths.ModelsFolder);
            var target = Path.Combine(paths.ModelsFolder, $"{version}.model");
            ClearLeftovers(target);
            file = target;
            model.Save(file);
            token.ThrowIfCancellationRequested();

            // Checked last, just before registering: a lost lock means another instance may be retraining too, and two
            // challengers racing for one version name must not both be written.
            if (!await state.StillHoldsClusterLockAsync(job.Id, token))
                throw new InvalidOperationException("This instance lost the retrain lock (its database session for the lock ended), so another " +
                    "instance may have started a retrain meanwhile; the challenger was not registered. Start the retrain again.");
            var entity = ModelVersion.Register(model.Metadata, Path.GetRelativePath(paths.DataFolder, file), JsonSerializer.Serialize(job.Settings, Json));
            entity.AttachComparison(championVersion.Version, JsonSerializer.Serialize(comparison, Json));
            db.ModelVersions.Add(entity);
            db.AuditEvents.Add(new AuditEvent(job.By.UserName, "model.retrained",
                $"{version} ({model.Metadata.Trainer}) challenger on {set.Rows.Count} labelled rows ({set.AuditSample} audit sample); holdout ROC AUC " +
                $"{comparison.Challenger.RocAuc:0.000} vs {championVersion.Version} {comparison.Champion?.RocAuc:0.000}", Now));
            // Past this point the challenger exists: a late cancel no longer undoes it.
            await db.SaveChangesAsync(CancellationToken.None);
            registered = true;
            result = new(job.Id, RetrainOutcome.Succeeded, $"Challenger {version} is ready to compare.", version, Now);
        }
        catch (OperationCanceledException) when (token.IsCancellationRequested)
        {
            result = new(job.Id, RetrainOutcome.Cancelled, $"Cancelled while {stage.ToLowerInvariant()}; the serving model is unchanged.", null, Now);
        }
        catch (Exception e)
        {
            log.LogWarning(e, "Retrain failed while {Stage}", stage);
            result = new(job.Id, RetrainOutcome.Failed, $"Failed while {stage.ToLowerInvariant()}: {e.Message} The serving model is unchanged.", null, Now);
        }
        finally
        {
            if (!registered && file is not null && File.Exists(file)) File.Delete(file);
        }
        if (result.Outcome != RetrainOutcome.Succeeded) await AuditEndAsync(job, result);
        state.Finish(result);
        return result;
    }

    private DateTime Now => clock.GetUtcNow().UtcDateTime;

    /// <summary>
    /// A file under this version's name belongs to no registered version (the name is one past the highest in
    /// use, and one retrain runs at a time): a retrain stopped hard between saving and registering left it, or
    /// its half-written temporary file. Without this, every later retrain would refuse that name.
    /// </summary>
    private void ClearLeftovers(string target)
    {
        var name = Path.GetFileName(target);
        foreach (var left in Directory.EnumerateFiles(paths.ModelsFolder, $".{name}.*.tmp").Append(target).Where(File.Exists))
        {
            log.LogWarning("Removing {File}: left by a retrain that stopped before registering it", left);
            File.Delete(left);
        }
    }

    private async Task AuditEndAsync(RetrainJob job, RetrainResult result)
    {
        // Whatever the failed attempt left tracked must not be saved with the audit event.
        db.ChangeTracker.Clear();
        db.AuditEvents.Add(new AuditEvent(job.By.UserName, result.Outcome == RetrainOutcome.Cancelled ? "model.retrain-cancelled" : "model.retrain-failed",
            result.Message, Now));
        await db.SaveChangesAsync(CancellationToken.None);
    }

    /// <summary>v1, v2, …: one more than the highest number in use.</summary>
    private async Task<string> NextVersionAsync(CancellationToken ct)
    {
        var names = await db.ModelVersions.Select(v => v.Version).ToListAsync(ct);
        var highest = names.Select(n => n.StartsWith('v') && int.TryParse(n[1..], out var k) ? k : 0).DefaultIfEmpty(0).Max();
        return $"v{highest + 1}";
    }

    /// <summary>The top k the team can work in a day: the investigators' daily capacities added up.</summary>
    private Task<int> DailyCapacityAsync(CancellationToken ct)
    {
        var role = db.Roles.Where(r => r.Name == Roles.Investigator).Select(r => r.Id);
        return db.Users.Where(u => db.UserRoles.Any(ur => ur.UserId == u.Id && role.Contains(ur.RoleId))).SumAsync(u => u.DailyCapacity, ct);
    }

    /// <summary>Reports on the caller's thread (Progress&lt;T&gt; would post to a context and arrive late).</summary>
    private sealed class SyncProgress<T>(Action<T> report) : IProgress<T>
    {
        public void Report(T value) => report(value);
    }
}
