using System.Diagnostics;
using Microsoft.AspNetCore.Identity;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.Logging;
using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Intake;
using Triage.Cases.Options;
using Triage.Cases.Queue;
using Triage.Cases.Store;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Cases.FirstStart;

/// <summary>
/// Brings the store up to date, and on a store without claims loads the demo scenario: history, team,
/// playbook, a first model trained on the history, and cases for the open claims it rates risky.
/// All of the seeding commits in one transaction, so a failed first start leaves an empty store.
/// </summary>
public sealed class StoreInitialiser(
    TriageDbContext db,
    UserManager<TriageUser> users,
    RoleManager<IdentityRole> roles,
    ModelTrainer trainer,
    TriagePaths paths,
    IOptions<DemoOptions> demo,
    IOptions<QueueOptions> queue,
    HistoricCases historic,
    TimeProvider clock,
    ILogger<StoreInitialiser> log)
{
    private const int BatchSize = 2_000;
    public const string FirstModelVersion = "v1";
    private const int AuditSeed = 11;

    public async Task InitialiseAsync(CancellationToken ct)
    {
        var watch = Stopwatch.StartNew();
        if (db.Database.IsSqlite()) await SqliteMigrationGate.MigrateAsync(db, log, ct);
        else await db.Database.MigrateAsync(ct);
        log.LogInformation("Store migrated ({Provider}) in {Ms} ms", db.Database.ProviderName, watch.ElapsedMilliseconds);
        if (await db.Claims.AnyAsync(ct))
        {
            log.LogInformation("Store already holds claims; first start skipped");
            return;
        }
        var seed = paths.SeedFolder;
        if (!File.Exists(Path.Combine(seed, "scenario.json")))
        {
            log.LogWarning("Store is empty and {Folder} holds no scenario.json; starting with an empty store", seed);
            return;
        }
        // The model file is the one thing outside the transaction: remove it if the seeding fails.
        var modelFile = Path.Combine(paths.ModelsFolder, $"{FirstModelVersion}.model");
        await using var tx = await db.Database.BeginTransactionAsync(ct);
        try
        {
            await SeedAsync(seed, modelFile, watch, ct);
            await tx.CommitAsync(ct);
        }
        catch
        {
            if (File.Exists(modelFile)) File.Delete(modelFile);
            throw;
        }
        log.LogInformation("First start finished in {Seconds:0.0} s", watch.Elapsed.TotalSeconds);
    }

    private async Task SeedAsync(string seed, string modelFile, Stopwatch watch, CancellationToken ct)
    {
        var now = clock.GetUtcNow().UtcDateTime;
        var today = DateOnly.FromDateTime(now);
        var schema = ClaimSchema.Load(Path.Combine(seed, "schema.json"));
        var scenario = SeedFiles.Read<Scenario>(Path.Combine(seed, "scenario.json"));
        var shift = today.DayNumber - scenario.AsOf.DayNumber;
        log.LogInformation("Loading the {Insurer} scenario from {Folder}, dates moved by {Days} days", scenario.Insurer, seed, shift);

        var history = SeedClaims.Read(Path.Combine(seed, "history.csv"), schema, shift, history: true);
        var open = SeedClaims.Read(Path.Combine(seed, "open-claims.csv"), schema, shift, history: false);
        var playbook = SeedFiles.Playbook(Path.Combine(seed, "playbook.json"), schema);
        await InsertAsync(history.Select(h => h.Claim), ct);
        await InsertAsync(open.Select(o => o.Claim), ct);
        db.PlaybookRules.AddRange(playbook);
        db.AuditEvents.Add(new AuditEvent(Actor.System.UserName, "seed.loaded",
            $"{history.Count} closed and {open.Count} open claims, {playbook.Count} playbook rules", now));
        await db.SaveChangesAsync(ct);
        log.LogInformation("Stored {History} history and {Open} open claims ({Ms} ms)", history.Count, open.Count, watch.ElapsedMilliseconds);

        var team = demo.Value.Enabled ? await CreateDemoAccountsAsync(Path.Combine(seed, "team.json"), now, ct) : [];

        var model = TrainFirstModel(schema, history, modelFile, ct);
        // Promoted when training has ended, not when the start began: the model list shows it trained, then serving.
        db.ModelVersions.Add(await RegisterAsync(model, modelFile, clock.GetUtcNow().UtcDateTime, ct));
        log.LogInformation("Model {Version} trained on {Rows} claims, holdout ROC AUC {Auc:0.000} ({Ms} ms)",
            model.Metadata.Version, model.Metadata.TrainingRows, model.Metadata.Holdout.RocAuc, watch.ElapsedMilliseconds);

        var scored = CaseOpener.Score(model, open.Select(o => (o.Claim, o.Values)), ct);
        var threshold = queue.Value.Threshold;
        // Seeded, so the demo's audit sample is the same on every machine.
        var sampler = new AuditSampler(queue, new Random(AuditSeed));
        var opened = scored.Select(s => (Scored: s, Selection: sampler.Decide(s.Explanation.Probability))).Where(x => x.Selection is not null).ToList();
        var cases = opened
            .Select(x => CaseOpener.Open(x.Scored, model.Metadata.Version, playbook, x.Scored.Claim.ReportDate, queue.Value.DueDays, Actor.System, x.Selection))
            .ToList();
        var queuedClaims = opened.Select(x => x.Scored.Claim).ToHashSet();
        AssignDemoCases(cases, team);
        db.ChangeTracker.AutoDetectChangesEnabled = false;
        foreach (var batch in cases.Chunk(BatchSize / 4))
        {
            // The claims were stored (and let go) above: attach them as they are, then add the cases.
            db.Claims.AttachRange(batch.Select(c => c.Claim!));
            db.Cases.AddRange(batch);
            await db.SaveChangesAsync(ct);
        }
        db.ChangeTracker.AutoDetectChangesEnabled = true;
        // Every open claim keeps the score it arrived with, as claims taken in later do.
        db.ClaimScores.AddRange(scored.Select(s => ClaimScore.Record(s.Claim, s.Explanation, model.Metadata.Version, queuedClaims.Contains(s.Claim), now)));
        db.AuditEvents.Add(new AuditEvent(Actor.System.UserName, "cases.opened",
            $"{cases.Count} of {scored.Count} open claims queued: at or above {threshold:0.00} or drawn for the audit sample ({cases.Count(c => c.IsAuditSample)})", now));
        await db.SaveChangesAsync(ct);
        log.LogInformation("Scored {Open} open claims; {Cases} at or above {Threshold:0.00} opened as cases ({Ms} ms)",
            scored.Count, cases.Count, threshold, watch.ElapsedMilliseconds);
        await historic.CreateAsync(schema, history, model, team, playbook, ct);
        db.ChangeTracker.Clear();
    }

    /// <summary>Adds rows in batches with change detection off; the change tracker is cleared between batches.</summary>
    private async Task InsertAsync(IEnumerable<Claim> claims, CancellationToken ct)
    {
        db.ChangeTracker.AutoDetectChangesEnabled = false;
        foreach (var batch in claims.Chunk(BatchSize))
        {
            db.Claims.AddRange(batch);
            await db.SaveChangesAsync(ct);
            db.ChangeTracker.Clear();
        }
        db.ChangeTracker.AutoDetectChangesEnabled = true;
    }

    private ScoringModel TrainFirstModel(ClaimSchema schema, List<SeedClaim> history, string file, CancellationToken ct)
    {
        var rows = history
            .Where(h => h.Outcome is VerdictOutcome.ConfirmedFraud or VerdictOutcome.NotFraud)
            .Select(h => new LabelledClaim(h.Values, h.Outcome == VerdictOutcome.ConfirmedFraud))
            .ToList();
        var lastStage = "";
        var progress = new Progress<TrainingProgress>(p =>
        {
            if (p.Stage == lastStage) return;
            lastStage = p.Stage;
            log.LogInformation("Training: {Stage}", p.Stage);
        });
        var model = trainer.Train(schema, rows, new TrainingRequest(FirstModelVersion, TrainedBy: Actor.System.UserName), progress, ct);
        Directory.CreateDirectory(Path.GetDirectoryName(file)!);
        var temp = file + ".tmp";
        model.Save(temp);
        File.Move(temp, file, overwrite: true);
        return model;
    }

    private async Task<ModelVersion> RegisterAsync(ScoringModel model, string file, DateTime now, CancellationToken ct)
    {
        var version = ModelVersion.Register(model.Metadata, Path.GetRelativePath(paths.DataFolder, file));
        var serving = await db.ModelVersions.SingleOrDefaultAsync(m => m.IsServing, ct);
        version.Promote(serving, Actor.System, now, "First model, trained on the seed history at first start");
        db.AuditEvents.Add(new AuditEvent(Actor.System.UserName, "model.promoted", $"{version.Version} ({version.Trainer})", now));
        return version;
    }

    private async Task<IReadOnlyList<(TriageUser User, TeamMember Member)>> CreateDemoAccountsAsync(string path, DateTime now, CancellationToken ct)
    {
        var team = SeedFiles.Read<TeamFile>(path);
        SeedFiles.CheckTeam(path, team);
        foreach (var role in Roles.All)
            if (!await roles.RoleExistsAsync(role)) Check(await roles.CreateAsync(new IdentityRole(role)), $"role {role}");
        var created = new List<(TriageUser, TeamMember)>();
        foreach (var p in team.People)
        {
            ct.ThrowIfCancellationRequested();
            var user = new TriageUser
            {
                UserName = p.UserName,
                Email = p.Email,
                EmailConfirmed = true,
                DisplayName = p.DisplayName,
                Lines = string.Join(',', p.Lines),
                DailyCapacity = p.DailyCapacity,
            };
            Check(await users.CreateAsync(user, demo.Value.Password!), $"{path}, person '{p.UserName}'");
            Check(await users.AddToRolesAsync(user, p.Roles), $"{path}, person '{p.UserName}'");
            created.Add((user, p));
        }
        db.AuditEvents.Add(new AuditEvent(Actor.System.UserName, "demo.accounts", $"{created.Count} demo accounts", now));
        log.LogInformation("Created {Count} demo accounts", created.Count);
        return created;
    }

    /// <summary>Gives each demo investigator a day's worth of the riskiest cases on their lines, so "My cases" is not empty.</summary>
    private static void AssignDemoCases(List<Case> cases, IReadOnlyList<(TriageUser User, TeamMember Member)> team)
    {
        var load = team.Where(t => t.Member.Roles.Contains(Roles.Investigator)).ToDictionary(t => t.User, _ => 0);
        foreach (var c in cases.OrderByDescending(c => c.Probability))
        {
            var who = load.Where(kv => kv.Value < kv.Key.DailyCapacity && kv.Key.Covers(c.Line))
                .OrderBy(kv => kv.Value).Select(kv => kv.Key).FirstOrDefault();
            if (who is null) continue;
            // Dated when the case opened, as if taken the day it arrived: today's capacity stays free for the team page.
            c.AssignTo(who, Actor.System, c.OpenedAt, "demo start");
            load[who]++;
        }
    }

    private static void Check(IdentityResult result, string what)
    {
        if (!result.Succeeded)
            throw new InvalidDataException($"{what}: {string.Join("; ", result.Errors.Select(e => e.Description))}");
    }
}
