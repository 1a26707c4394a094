using System.Diagnostics;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Triage.Cases;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Intake;
using Triage.Cases.Store;

namespace Triage.Bench.Intake;

/// <summary>
/// `intake`: a generated CSV of 100,000 claims parsed, validated, scored, explained and stored in SQLite
/// through <see cref="ClaimIntake"/>, over a store after first start on the shipped demo scenario (its
/// model serves). Prints claims/s, total time, peak working set, and the scoring-and-explaining step
/// alone (the same claims through <see cref="CaseOpener.Score"/> in intake-sized batches).
/// Targets: ≤ 20 s in total, peak working set ≤ 800 MB. Options: --claims N (100000).
/// </summary>
public static class IntakeBenchmark
{
    public static async Task<int> RunAsync(string[] args)
    {
        var count = args.Length >= 2 && args[0] == "--claims" ? int.Parse(args[1]) : 100_000;
        var folder = Directory.CreateTempSubdirectory("triage-bench-intake-").FullName;
        try
        {
            using var host = Build(folder);
            Console.WriteLine("intake: first start on the demo scenario (not timed)...");
            await host.Services.InitialiseStoreAsync();

            var (_, model) = await ServingAsync(host);
            var csv = Path.Combine(folder, "claims.csv");
            BenchClaims.WriteCsv(csv, model.Schema, count);
            Console.WriteLine($"intake: {count:N0} claims, {new FileInfo(csv).Length / 1e6:0.0} MB CSV, model {model.Metadata.Version} ({model.Metadata.Trainer}), {Environment.ProcessorCount} cores");

            var watch = Stopwatch.StartNew();
            var cpu = Process.GetCurrentProcess().TotalProcessorTime;
            ImportReport report;
            await using (var scope = host.Services.CreateAsyncScope())
                report = await scope.ServiceProvider.GetRequiredService<ClaimIntake>().ImportAsync(ImportSource.FromFile(csv), Actor.System);
            var total = watch.Elapsed;
            cpu = Process.GetCurrentProcess().TotalProcessorTime - cpu;
            var peak = Process.GetCurrentProcess().PeakWorkingSet64;
            if (report.Rejected || report.Stored != count)
                throw new InvalidOperationException($"The bench file was not taken whole: {report.Summary} {string.Join("; ", report.Errors.Take(3))}");

            watch.Restart();
            var scored = 0;
            foreach (var batch in BenchClaims.Generate(model.Schema, count).Chunk(2_000))
                scored += CaseOpener.Score(model, batch.Select(v => (Triage.Cases.FirstStart.SeedClaims.ToClaim(model.Schema, v), (IReadOnlyDictionary<string, string?>)v)), default).Count;
            var scoring = watch.Elapsed;

            Console.WriteLine($"stored {report.Stored:N0}, queued {report.Queued:N0} as cases");
            var t = report.Timings!;
            Console.WriteLine($"total {S(total)}, {count / total.TotalSeconds:N0} claims/s, CPU {S(cpu)} (load average {Load()})");
            Console.WriteLine($"  checking pass (parse, validate, compare with store) {S(t.Checking)}");
            Console.WriteLine($"  storing pass {S(total - t.Checking)}: writing rows and commit {S(t.Writing)}; beside it, scoring, explaining and opening cases {S(t.Scoring)}");
            Console.WriteLine($"scoring and explaining alone {S(scoring)} ({scored / scoring.TotalSeconds:N0} claims/s); total / scoring alone = {total / scoring:0.00}; the rest (parse, validate twice, store) {S(total - scoring)}");
            Console.WriteLine($"peak working set {peak / 1e6:0} MB (the process, first start included)");
            var met = total.TotalSeconds <= 20 && peak <= 800e6;
            Console.WriteLine(met ? "targets met (≤ 20 s, ≤ 800 MB)" : "TARGETS MISSED (≤ 20 s, ≤ 800 MB)");
            return met ? 0 : 1;
        }
        finally
        {
            Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
            Directory.Delete(folder, recursive: true);
        }
    }

    private static string S(TimeSpan t) => $"{t.TotalSeconds:0.00} s";

    // Other work on the machine slows every figure; the 1-minute load average says how busy it was.
    private static string Load() => File.Exists("/proc/loadavg") ? File.ReadAllText("/proc/loadavg").Split(' ')[0] : "n/a";

    private static IHost Build(string folder)
    {
        var b = Host.CreateApplicationBuilder();
        b.Configuration.AddTriageSettings("Production");
        b.Configuration.AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Storage:DataFolder"] = Path.Combine(folder, "data"),
            ["Demo:Enabled"] = "false",
            ["Logging:LogLevel:Default"] = "Warning",
        });
        b.AddTriageCases();
        return b.Build();
    }

    private static async Task<(Triage.Cases.Domain.ModelVersion, Triage.Scoring.Models.ScoringModel)> ServingAsync(IHost host)
    {
        await using var scope = host.Services.CreateAsyncScope();
        return await scope.ServiceProvider.GetRequiredService<ServingModels>().CurrentAsync(scope.ServiceProvider.GetRequiredService<TriageDbContext>(), default);
    }
}
