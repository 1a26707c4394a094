using System.Reflection;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Triage.Cases.Accounts;
using Triage.Cases.ApiKeys;
using Triage.Cases.Backup;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cases.Intake;
using Triage.Cases.Models;
using Triage.Cases.Queue;
using Triage.Cases.Store;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Models;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Security;

/// <summary>
/// Performs every state-changing action of the case services once and checks the audit trail: exactly one
/// event per action, naming the actor, the action, the case (when it acts on one) and the time. An action on
/// several cases leaves one event per case; one that also has an overall result (auto-balance, an import,
/// a promotion with re-scoring) adds one summary event. The list is checked against the services themselves:
/// every public async method of a service <see cref="CasesSetup.AddTriageCases"/> registers is either performed
/// here or named as not changing state, with why.
/// </summary>
public sealed class AuditCompletenessTests
{
    /// <summary>Public async methods that change nothing that needs an audit event, with the reason.</summary>
    private static readonly Dictionary<string, string> NotAudited = new()
    {
        ["CaseWorkService.ReloadAsync"] = "re-reads a case the page already opened (that opening was audited)",
        ["CaseFileQuery.GetAsync"] = "read used by CaseWorkService",
        ["QueueService.GetPageAsync"] = "read",
        ["QueueService.DriverFieldsAsync"] = "read",
        ["WorkloadService.GetAsync"] = "read",
        ["WorkloadService.CasesOfAsync"] = "read",
        ["WorkloadService.PoolAsync"] = "read",
        ["AutoBalanceService.PlanAsync"] = "a plan shown before applying; nothing is saved",
        ["TeamDirectory.ListAsync"] = "read",
        ["InsightsService.ByDriverAsync"] = "read",
        ["InsightsService.ByInvestigatorAsync"] = "read",
        ["InsightsService.ByMonthAsync"] = "read",
        ["InsightsService.CalibrationAsync"] = "read",
        ["InsightsService.AuditSampleAsync"] = "read",
        ["InsightsService.QueueAgeAsync"] = "read",
        ["InsightsService.FilterChoicesAsync"] = "read",
        ["DriftService.CurrentAsync"] = "read",
        ["OutcomeExportService.CountAsync"] = "read",
        ["OutcomeExportService.FilterChoicesAsync"] = "read",
        ["OutcomeExportService.PrepareAsync"] = "checks the role and columns; the export is audited when written",
        ["ApiKeyService.ListAsync"] = "read",
        ["ApiKeyService.AuthenticateAsync"] = "stamps the key's last use; the request it admits is audited (e.g. claims.imported by the key)",
        ["ModelRegistry.ListAsync"] = "read",
        ["ModelRegistry.RecentActivityAsync"] = "read",
        ["ServingModels.CurrentAsync"] = "loads the serving model into memory",
        ["ServingModels.RefreshAsync"] = "reloads the serving model after another instance promoted (the promotion was audited there)",
        ["ServingModelWatch.CheckAsync"] = "compares the registry's champion with the loaded one; loading is not a change",
        ["SqliteWriteTurns.TakeAsync"] = "waits for this process's SQLite write turn; the write it guards is audited",
        ["SaveChangesTurns.SaveChangesFailedAsync"] = "hands the write turn on after a failed save",
        ["SaveChangesTurns.SaveChangesCanceledAsync"] = "hands the write turn on after a cancelled save",
        ["FileLocks.AcquireAsync"] = "a turn for first start or a retrain between processes on one SQLite file; the work it guards is audited",
        ["FileLocks.TryAcquireAsync"] = "a turn for first start or a retrain between processes on one SQLite file; the work it guards is audited",
        ["RetrainRunner.RunAsync"] = "the worker's half of RetrainService.StartAsync; its outcome event is checked through RetrainService.RunAsync",
        ["StoreInitialiser.InitialiseAsync"] = "first start by the system (migrations, demo scenario); audited as seed.loaded and friends",
        ["HistoricCases.CreateAsync"] = "part of first start",
    };

    /// <summary>The actions this test performs (filled as it goes, then compared with the services).</summary>
    private readonly HashSet<string> _performed = [];

    [Fact]
    public void Every_public_async_service_method_is_either_performed_below_or_named_as_a_read()
    {
        var builder = Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { EnvironmentName = "Testing" });
        builder.AddTriageCases();
        var services = builder.Services
            .Select(d => d.ImplementationType ?? d.ServiceType)
            .Where(t => t.Assembly == typeof(CasesSetup).Assembly && !typeof(DbContext).IsAssignableFrom(t))
            .Append(typeof(OutcomeExportService.PreparedExport))
            .Distinct();
        var methods = services
            .SelectMany(t => t.GetMethods(BindingFlags.Public | BindingFlags.Instance | BindingFlags.DeclaredOnly)
                .Where(m => typeof(Task).IsAssignableFrom(m.ReturnType) || m.ReturnType == typeof(ValueTask))
                .Select(m => $"{t.Name}.{m.Name}"))
            .Distinct().Order().ToList();
        Assert.NotEmpty(methods);
        var unlisted = methods.Where(m => !Performed.Contains(m) && !NotAudited.ContainsKey(m)).ToList();
        Assert.True(unlisted.Count == 0,
            "Service methods neither audited below nor listed as reads (add them to AuditCompletenessTests): " + string.Join(", ", unlisted));
        var gone = Performed.Concat(NotAudited.Keys).Where(m => !methods.Contains(m)).ToList();
        Assert.True(gone.Count == 0, "Listed methods the services no longer have: " + string.Join(", ", gone));
    }

    /// <summary>What <see cref="Every_state_changing_action_leaves_exactly_one_audit_event_per_case_it_changes"/> performs.</summary>
    private static readonly string[] Performed =
    [
        "UserAccounts.AddAsync", "UserAccounts.SetRolesAsync",
        "TakeNextService.TakeNextAsync",
        "ReassignService.ReassignAsync", "ReassignService.ReturnToPoolAsync", "ReassignService.ReturnAllToPoolAsync",
        "AbsenceService.MarkAbsentAsync", "AbsenceService.MarkPresentAsync",
        "AutoBalanceService.ApplyAsync",
        "CaseWorkService.OpenAsync", "CaseWorkService.ReportAsync",
        "CaseWorkService.TickCheckAsync", "CaseWorkService.UntickCheckAsync", "CaseWorkService.AddNoteAsync",
        "CaseWorkService.RecordVerdictAsync", "CaseWorkService.AmendVerdictAsync",
        "ClaimIntake.ImportAsync",
        "PreparedExport.WriteAsync",
        "ApiKeyService.CreateAsync", "ApiKeyService.RevokeAsync",
        "RetrainService.RunAsync", "RetrainService.StartAsync", "RetrainService.CancelAsync",
        "ModelRegistry.PromoteAsync", "ModelRegistry.RollBackAsync",
        "StoreBackup.BackupAsync", "StoreBackup.RestoreAsync",
    ];

    private sealed record Expected(string What, int? CaseId);

    [Fact]
    public async Task Every_state_changing_action_leaves_exactly_one_audit_event_per_case_it_changes()
    {
        await using var s = await ModelStore.CreateAsync();
        var ines = await ActorAsync(s, "ines.varga");
        var tomas = await ActorAsync(s, "tomas.reed");
        var lead = await ActorAsync(s, "mara.holt");
        var admin = await ActorAsync(s, "olu.berg");

        await Audited(s, "UserAccounts.AddAsync", admin, async sp =>
        {
            await sp.GetRequiredService<UserAccounts>().AddAsync(admin, new NewAccount("nia.new", "Nia New", "nia.new@example.test",
                [Roles.Investigator], ["motor"], 4), TinySeed.Password);
            return [new("user.added", null)];
        });
        await Audited(s, "UserAccounts.SetRolesAsync", admin, async sp =>
        {
            await sp.GetRequiredService<UserAccounts>().SetRolesAsync(admin, "nia.new", [Roles.Investigator, Roles.Analyst]);
            return [new("user.roles", null)];
        });

        var taken = 0;
        await Audited(s, "TakeNextService.TakeNextAsync", ines, async sp =>
        {
            taken = (await sp.GetRequiredService<TakeNextService>().TakeNextAsync(ines))!.CaseId;
            return [new("case.assigned", taken)];
        });

        // A pool case with a check, handed to Ines by the lead: the case the case-work actions run on.
        var worked = await InDb(s, db => db.Cases.Where(c => c.IsOpen && c.AssigneeId == null && c.Checks.Any() && (c.Line == "motor" || c.Line == "home"))
            .OrderByDescending(c => c.Probability).Select(c => c.Id).FirstAsync());
        await Audited(s, "ReassignService.ReassignAsync", lead, async sp =>
        {
            await sp.GetRequiredService<ReassignService>().ReassignAsync([await SeenAsync(s, worked)], ines.UserId, "has capacity", lead);
            return [new("case.assigned", worked)];
        });
        await Audited(s, "CaseWorkService.OpenAsync", ines, async sp =>
        {
            await sp.GetRequiredService<CaseWorkService>().OpenAsync(worked, ines);
            return [new("case.file-opened", worked)];
        });
        await Audited(s, "CaseWorkService.ReportAsync", ines, async sp =>
        {
            await sp.GetRequiredService<CaseWorkService>().ReportAsync(worked, ines);
            return [new("report.downloaded", worked)];
        });
        var check = await InDb(s, db => db.Set<CheckItem>().Where(k => k.CaseId == worked).Select(k => k.Id).FirstAsync());
        // The first tick also starts the review; that is part of the tick, not a second event.
        await CaseWork(s, "CaseWorkService.TickCheckAsync", ines, worked, (w, seen) => w.TickCheckAsync(worked, check, "seen the invoice", seen, ines), "check.done");
        await CaseWork(s, "CaseWorkService.UntickCheckAsync", ines, worked, (w, seen) => w.UntickCheckAsync(worked, check, seen, ines), "check.reopened");
        await CaseWork(s, "CaseWorkService.AddNoteAsync", ines, worked, (w, seen) => w.AddNoteAsync(worked, "called the repairer", seen, ines), "note.added");
        await CaseWork(s, "CaseWorkService.RecordVerdictAsync", ines, worked,
            (w, seen) => w.RecordVerdictAsync(worked, new VerdictInput(VerdictOutcome.NotFraud, VerdictReasons.ByOutcome[VerdictOutcome.NotFraud][0], null, null), seen, ines),
            "verdict.recorded");
        await CaseWork(s, "CaseWorkService.AmendVerdictAsync", lead, worked,
            (w, seen) => w.AmendVerdictAsync(worked, new VerdictInput(VerdictOutcome.Inconclusive, VerdictReasons.ByOutcome[VerdictOutcome.Inconclusive][0], "second look", null), seen, lead),
            "verdict.amended");

        await Audited(s, "ReassignService.ReturnToPoolAsync", lead, async sp =>
        {
            await sp.GetRequiredService<ReassignService>().ReturnToPoolAsync([await SeenAsync(s, taken)], "Ines is needed elsewhere", lead);
            return [new("case.returned", taken)];
        });
        await InScope(s, sp => sp.GetRequiredService<TakeNextService>().TakeNextAsync(tomas));
        var tomasCases = await InDb(s, db => db.Cases.Where(c => c.IsOpen && c.AssigneeId == tomas.UserId).Select(c => c.Id).ToListAsync());
        Assert.NotEmpty(tomasCases);
        await Audited(s, "ReassignService.ReturnAllToPoolAsync", lead, async sp =>
        {
            await sp.GetRequiredService<ReassignService>().ReturnAllToPoolAsync(tomas.UserId, "away this week", lead);
            return [.. tomasCases.Select(id => new Expected("case.returned", id))];
        });
        await Audited(s, "AbsenceService.MarkAbsentAsync", lead, async sp =>
        {
            await sp.GetRequiredService<AbsenceService>().MarkAbsentAsync(tomas.UserId, "training", lead);
            return [new("user.absent", null)];
        });
        await Audited(s, "AbsenceService.MarkPresentAsync", lead, async sp =>
        {
            await sp.GetRequiredService<AbsenceService>().MarkPresentAsync(tomas.UserId, lead);
            return [new("user.present", null)];
        });
        await Audited(s, "AutoBalanceService.ApplyAsync", lead, async sp =>
        {
            var balance = sp.GetRequiredService<AutoBalanceService>();
            var plan = await balance.PlanAsync(lead);
            Assert.NotEmpty(plan.Cases);
            await balance.ApplyAsync(plan, lead);
            return [new("pool.balanced", null), .. plan.Cases.Select(c => new Expected("case.assigned", c.CaseId))];
        });

        await Audited(s, "ClaimIntake.ImportAsync", admin, async sp =>
        {
            var before = await InDb(s, db => db.Cases.MaxAsync(c => c.Id));
            var csv = IntakeRows.Csv(IntakeRows.Many(6, "AUD"));
            var report = await sp.GetRequiredService<ClaimIntake>().ImportAsync(IntakeFixture.Source(IntakeRows.Utf8(csv)), admin);
            Assert.Equal(6, report.Stored);
            var opened = await InDb(s, db => db.Cases.Where(c => c.Id > before).Select(c => c.Id).ToListAsync());
            Assert.Equal(report.Queued, opened.Count);
            return [new("claims.imported", null), .. opened.Select(id => new Expected("case.opened", id))];
        });
        await Audited(s, "PreparedExport.WriteAsync", admin, async sp =>
        {
            var export = await sp.GetRequiredService<OutcomeExportService>().PrepareAsync(admin, new ExportFilter(), default);
            await export.WriteAsync(ExportFormat.Csv, new MemoryStream(), default);
            return [new("outcomes.exported", null)];
        });

        IssuedApiKey? key = null;
        await Audited(s, "ApiKeyService.CreateAsync", admin, async sp =>
        {
            key = await sp.GetRequiredService<ApiKeyService>().CreateAsync("audit test", admin);
            return [new("api-key.created", null)];
        });
        await Audited(s, "ApiKeyService.RevokeAsync", admin, async sp =>
        {
            await sp.GetRequiredService<ApiKeyService>().RevokeAsync(key!.Key.Id.ToString(), admin);
            return [new("api-key.revoked", null)];
        });

        // A foreground retrain (the CLI's) is two moments, start and outcome, each with its own event.
        await Audited(s, "RetrainService.RunAsync", admin, async sp =>
        {
            var retrain = sp.GetRequiredService<RetrainService>();
            Assert.Equal(RetrainOutcome.Succeeded, (await retrain.RunAsync(admin, retrain.Defaults())).Outcome);
            return [new("model.retrain-started", null), new("model.retrained", null)];
        });
        var open = await InDb(s, db => db.Cases.Where(c => c.IsOpen).Select(c => c.Id).ToListAsync());
        await Audited(s, "ModelRegistry.PromoteAsync", admin, async sp =>
        {
            var change = await sp.GetRequiredService<ModelRegistry>().PromoteAsync(admin, "v2", "better holdout", rescoreOpenCases: true);
            Assert.Equal(open.Count, change.CasesRescored);
            return [new("model.promoted", null), .. open.Select(id => new Expected("case.rescored", id))];
        });
        await Audited(s, "ModelRegistry.RollBackAsync", admin, async sp =>
        {
            await sp.GetRequiredService<ModelRegistry>().RollBackAsync(admin, "v1", "back to the known one", rescoreOpenCases: false);
            return [new("model.rolled-back", null)];
        });
        // The host is not started, so the background worker does not pick the job up: the retrain stays running to be cancelled.
        await Audited(s, "RetrainService.StartAsync", admin, async sp =>
        {
            var retrain = sp.GetRequiredService<RetrainService>();
            await retrain.StartAsync(admin, retrain.Defaults());
            return [new("model.retrain-started", null)];
        });
        await Audited(s, "RetrainService.CancelAsync", admin, async sp =>
        {
            await sp.GetRequiredService<RetrainService>().CancelAsync(admin);
            return [new("model.retrain-cancel", null)];
        });

        var archive = Path.Combine(s.Store.Folder, "audit-backup.zip");
        var beforeBackup = await LastAuditIdAsync(s);
        await Audited(s, "StoreBackup.BackupAsync", admin, async sp =>
        {
            await sp.GetRequiredService<StoreBackup>().BackupAsync(archive, admin);
            return [new("store.backed-up", null)];
        });
        // The restored store holds the trail as it was at the backup, then the restore's own event.
        await Audited(s, "StoreBackup.RestoreAsync", admin, async sp =>
        {
            await sp.GetRequiredService<StoreBackup>().RestoreAsync(archive, admin);
            return [new("store.restored", null)];
        }, since: beforeBackup);

        Assert.Equal(Performed.Order(), _performed.Order());
    }

    private async Task CaseWork(ModelStore s, string action, Actor actor, int caseId, Func<CaseWorkService, Triage.Cases.CaseFile.CaseStamp, Task> work, string what) =>
        await Audited(s, action, actor, async sp =>
        {
            var w = sp.GetRequiredService<CaseWorkService>();
            var seen = (await w.ReloadAsync(caseId, actor)).Stamp;
            await work(w, seen);
            return [new(what, caseId)];
        });

    /// <summary>Runs one action in its own scope and compares the audit events it left with the expected ones.</summary>
    private async Task Audited(ModelStore s, string action, Actor actor, Func<IServiceProvider, Task<List<Expected>>> act, long? since = null)
    {
        var before = since ?? await LastAuditIdAsync(s);
        var expected = await InScope(s, act);
        var events = await InDb(s, db => db.AuditEvents.AsNoTracking().Where(a => a.Id > before).OrderBy(a => a.Id).ToListAsync());
        Assert.True(Sorted(expected).SequenceEqual(Sorted(events.Select(e => new Expected(e.What, e.CaseId)))),
            $"{action}: expected [{string.Join(", ", expected)}], the audit trail got [{string.Join(", ", events.Select(e => $"{e.What} case {e.CaseId}"))}]");
        Assert.All(events, e =>
        {
            Assert.Equal(actor.UserName, e.Who);
            Assert.Equal(TestStore.Today.UtcDateTime, e.At);
        });
        _performed.Add(action);
    }

    private static IEnumerable<Expected> Sorted(IEnumerable<Expected> e) => e.OrderBy(x => x.What, StringComparer.Ordinal).ThenBy(x => x.CaseId);

    private static Task<long> LastAuditIdAsync(ModelStore s) => InDb(s, db => db.AuditEvents.MaxAsync(a => a.Id));

    private static async Task<T> InScope<T>(ModelStore s, Func<IServiceProvider, Task<T>> use)
    {
        await using var scope = s.Store.Host.Services.CreateAsyncScope();
        return await use(scope.ServiceProvider);
    }

    private static async Task<T> InDb<T>(ModelStore s, Func<TriageDbContext, Task<T>> read)
    {
        await using var db = s.Store.NewContext();
        return await read(db);
    }

    private static Task<CaseSeen> SeenAsync(ModelStore s, int id) =>
        InDb(s, db => db.Cases.Where(c => c.Id == id).Select(c => new CaseSeen(c.Id, c.Version)).SingleAsync());

    private static async Task<Actor> ActorAsync(ModelStore s, string userName)
    {
        await using var db = s.Store.NewContext();
        var user = await db.Users.SingleAsync(u => u.UserName == userName);
        var roles = await (from ur in db.UserRoles join r in db.Roles on ur.RoleId equals r.Id where ur.UserId == user.Id select r.Name!).ToListAsync();
        return new Actor(user.Id, userName, roles.ToHashSet());
    }
}
