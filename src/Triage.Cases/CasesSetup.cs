using Microsoft.AspNetCore.Identity;
using Microsoft.EntityFrameworkCore;
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
using Triage.Cases.Intake;
using Triage.Cases.Models;
using Triage.Cases.Insights;
using Triage.Cases.Options;
using Triage.Cases.Queue;
using Triage.Cases.Store;
using Triage.Cases.TeamLead;
using Triage.Scoring;

namespace Triage.Cases;

public static class CasesSetup
{
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
        s.AddSingleton<IValidateOptions<StorageOptions>, StorageOptionsValidator>();
        s.AddSingleton<IValidateOptions<DemoOptions>, DemoOptionsValidator>();
        s.AddSingleton<TriagePaths>();
        s.TryAddSingleton(TimeProvider.System);

        // The provider decides the context type, so it is read now; everything else is read when used.
        var provider = b.Configuration[$"{StorageOptions.Section}:Provider"];
        if (string.Equals(provider, nameof(StorageProvider.Postgres), StringComparison.OrdinalIgnoreCase))
            s.AddDbContext<TriageDbContext, PostgresTriageDbContext>((sp, o) =>
                o.UseNpgsql(sp.GetRequiredService<IOptions<StorageOptions>>().Value.ConnectionString));
        else
            // One statement per command: Microsoft.Data.Sqlite re-prepares every statement of a multi-statement
            // batch, and bench `intake` stored claims twice as fast unbatched (measured here, 2 cores).
            s.AddDbContext<TriageDbContext, SqliteTriageDbContext>((sp, o) => o.UseSqlite(SqliteConnection(sp), x => x.MaxBatchSize(1)));

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

    /// <summary>Migrates the store and, when it holds no claims yet, loads the demo scenario. Call before <c>Run()</c>.</summary>
    public static async Task InitialiseStoreAsync(this IServiceProvider services, CancellationToken ct = default)
    {
        await using var scope = services.CreateAsyncScope();
        await scope.ServiceProvider.GetRequiredService<StoreInitialiser>().InitialiseAsync(ct);
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
