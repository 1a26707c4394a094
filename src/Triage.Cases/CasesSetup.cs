using Microsoft.AspNetCore.Identity;
using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Infrastructure;
using Microsoft.EntityFrameworkCore.Storage;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.DependencyInjection.Extensions;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;
using Triage.Cases.Accounts;
using Triage.Cases.Backup;
using Triage.Cases.ApiKeys;
using Triage.Cases.CaseFile;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Drift;
using Triage.Cases.Export;
using Triage.Cases.FirstStart;
using Triage.Cases.Hosting;
using Triage.Cases.Instances;
using Triage.Cases.Intake;
using Triage.Cases.Models;
using Triage.Cases.Insights;
using Triage.Cases.Operations;
using Triage.Cases.Options;
using Triage.Cases.Queue;
using Triage.Cases.Store;
using Triage.Cases.TeamLead;
using Triage.Scoring;

namespace Triage.Cases;

public static class CasesSetup
{
    /// <summary>The health checks that decide whether this instance may take traffic.</summary>
    public const string ReadyTag = "ready";

    /// <summary>Registers scoring, the store for the configured provider, Identity's user store and the case services.</summary>
    public static IHostApplicationBuilder AddTriageCases(this IHostApplicationBuilder b)
    {
        b.AddTriageScoring();
        var s = b.Services;
        s.AddOptions<StorageOptions>().BindConfiguration(StorageOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        s.AddOptions<DemoOptions>().BindConfiguration(DemoOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        s.AddOptions<QueueOptions>().BindConfiguration(QueueOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        s.AddOptions<DriftOptions>().BindConfiguration(DriftOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        s.AddOptions<IntakeOptions>().BindConfiguration(IntakeOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        s.AddOptions<InstanceOptions>().BindConfiguration(InstanceOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        s.AddSingleton<IValidateOptions<StorageOptions>, StorageOptionsValidator>();
        s.AddSingleton<IValidateOptions<DemoOptions>, DemoOptionsValidator>();
        s.AddSingleton<TriagePaths>();
        s.TryAddSingleton(TimeProvider.System);

        // The provider decides the context type, so it is read now; everything else is read when used.
        var provider = b.Configuration[$"{StorageOptions.Section}:Provider"];
        var health = s.AddHealthChecks()
            .AddCheck<StoreReadyCheck>("store", tags: [ReadyTag])
            .AddCheck<ServingModelCheck>("model", tags: [ReadyTag]);
        if (string.Equals(provider, nameof(StorageProvider.Postgres), StringComparison.OrdinalIgnoreCase))
        {
            s.AddDbContext<TriageDbContext, PostgresTriageDbContext>((sp, o) =>
                o.UseNpgsql(sp.GetRequiredService<IOptions<StorageOptions>>().Value.ConnectionString));
            // Several instances may share this store: they tell each other about changes and take turns where only one may act.
            s.AddSingleton<PostgresNotices>();
            s.AddSingleton<IInstanceNotices>(sp => sp.GetRequiredService<PostgresNotices>());
            s.AddSingleton<IClusterLocks, PostgresAdvisoryLocks>();
            s.AddSingleton<PostgresNoticeListener>();
            s.AddHostedService(sp => sp.GetRequiredService<PostgresNoticeListener>());
            health.AddCheck<InstanceLinkCheck>("instances", tags: [ReadyTag]);
        }
        else
        {
            // One statement per command: Microsoft.Data.Sqlite re-prepares every statement of a multi-statement
            // batch, and bench `intake` stored claims twice as fast unbatched (measured here, 2 cores).
            s.AddDbContext<TriageDbContext, SqliteTriageDbContext>((sp, o) => o.UseSqlite(SqliteConnection(sp), x => x.MaxBatchSize(1))
                .AddInterceptors(sp.GetRequiredService<SaveChangesTurns>()));
            s.AddSingleton<SaveChangesTurns>();
            s.AddSingleton<IInstanceNotices, SingleInstance>();
            s.AddSingleton<IClusterLocks, FileLocks>();
        }
        s.AddSingleton<SqliteWriteTurns>();
        s.AddSingleton<InstanceId>();
        s.AddSingleton<TriageMetrics>();
        s.AddSingleton<ServingModelWatch>();
        s.AddHostedService(sp => sp.GetRequiredService<ServingModelWatch>());

        s.AddIdentityCore<TriageUser>(o =>
            {
                o.User.RequireUniqueEmail = true;
                o.Lockout.MaxFailedAccessAttempts = 5;
                o.Lockout.DefaultLockoutTimeSpan = TimeSpan.FromMinutes(15);
                o.Lockout.AllowedForNewUsers = true;
            })
            .AddRoles<IdentityRole>()
            .AddEntityFrameworkStores<TriageDbContext>();

        s.AddScoped<StoreInitialiser>();
        s.AddScoped<QueueService>();
        s.AddSingleton<AuditSampler>();
        s.AddScoped<TakeNextService>();
        s.AddScoped<UserAccounts>();
        s.AddScoped<CaseFileQuery>();
        s.AddScoped<CaseWorkService>();
        s.AddSingleton<CaseEvents>();
        s.AddScoped<TeamDirectory>();
        s.AddSingleton<ServingModels>();
        s.AddScoped<ClaimIntake>();
        s.AddScoped<ApiKeyService>();
        s.AddScoped<ReassignService>();
        s.AddScoped<WorkloadService>();
        s.AddScoped<AbsenceService>();
        s.AddScoped<AutoBalanceService>();
        s.AddScoped<InsightsService>();
        s.AddScoped<HistoricCases>();
        s.AddScoped<StoreBackup>();
        s.AddScoped<DriftService>();
        s.AddScoped<OutcomeExportService>();
        s.AddSingleton<Pseudonyms>();
        s.AddSingleton<RetrainState>();
        s.AddSingleton<RetrainQueue>();
        s.AddScoped<RetrainRunner>();
        s.AddScoped<RetrainService>();
        s.AddScoped<ModelRegistry>();
        s.AddHostedService<RetrainWorker>();
        return b;
    }

    /// <summary>
    /// Migrates the store and, when it holds no claims yet, loads the demo scenario. Call before <c>Run()</c>.
    /// Instances starting together on one PostgreSQL store take turns: the first migrates and seeds, the
    /// others wait and then find the work done.
    /// </summary>
    public static async Task InitialiseStoreAsync(this IServiceProvider services, CancellationToken ct = default)
    {
        await using var scope = services.CreateAsyncScope();
        var sp = scope.ServiceProvider;
        var db = sp.GetRequiredService<TriageDbContext>();
        // The lock lives in the database, so a database that does not exist yet is created (empty) first.
        if (db.Database.IsNpgsql() && !await db.Database.CanConnectAsync(ct))
        {
            try
            {
                await db.GetService<IRelationalDatabaseCreator>().CreateAsync(ct);
            }
            catch (Npgsql.PostgresException e) when (e.SqlState == Npgsql.PostgresErrorCodes.DuplicateDatabase)
            {
                // Another instance created it a moment ago.
            }
        }
        using var turn = await sp.GetRequiredService<IClusterLocks>().AcquireAsync(ClusterLock.FirstStart, ct);
        await sp.GetRequiredService<StoreInitialiser>().InitialiseAsync(ct);
    }

    private static string SqliteConnection(IServiceProvider sp)
    {
        var configured = sp.GetRequiredService<IOptions<StorageOptions>>().Value.ConnectionString;
        if (!string.IsNullOrWhiteSpace(configured)) return configured;
        var paths = sp.GetRequiredService<TriagePaths>();
        Directory.CreateDirectory(paths.DataFolder);
        return $"Data Source={paths.SqliteFile}";
    }
}
