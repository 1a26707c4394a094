using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Text.Json;
using Triage.Scoring.Models;
using Xunit.Abstractions;

namespace Triage.EndToEnd.CrashSafety;

/// <summary>
/// The app killed with SIGKILL (no shutdown code runs) at seeded random moments in the middle of a large
/// import and of a retrain, then started again: the store passes SQLite's integrity check, a batch of claims
/// is stored whole or not at all, every registered model file is whole, the serving model scores, and the
/// work can simply be done again. The seed and every kill moment are written to the test output;
/// TRIAGE_CRASH_SEED replays a run.
/// </summary>
public sealed class CrashSafetyTests(CrashTemplate template, ITestOutputHelper output) : IClassFixture<CrashTemplate>
{
    private const int Kills = 10;
    private const int BatchSize = 2_000;
    // The stage RetrainRunner reports just before it writes the model file (the CLI prints each stage on standard error).
    private const string SavingStage = "Saving the challenger";
    private static readonly int Seed = int.TryParse(Environment.GetEnvironmentVariable("TRIAGE_CRASH_SEED"), out var s) ? s : 20261202;

    [Fact]
    public async Task Killed_in_the_middle_of_imports_the_store_is_whole_and_each_batch_all_or_nothing()
    {
        var random = new Random(Seed);
        output.WriteLine($"seed {Seed}");
        var folder = template.NewDataFolder();
        var store = new StoreOnDisk(folder);
        await using var app = AppProcess.On(folder, template.Settings);
        await app.StartAsync();
        using var http = new HttpClient { Timeout = TimeSpan.FromMinutes(3) };

        // One import run to its end measures the window the kills are drawn from (the first import after a start, as each killed one is).
        var batches = new List<ClaimBatch> { new("CRASH-I00-", BatchSize) };
        var clock = Stopwatch.StartNew();
        Assert.Equal(BatchSize, await StoredAsync(await batches[0].PostAsync(http, app.BaseUrl, template.ApiKey)));
        var window = clock.Elapsed;
        output.WriteLine($"a whole import of {BatchSize} claims took {window.TotalSeconds:0.00} s");

        var killed = 0;
        for (var attempt = 1; killed < Kills && attempt <= 2 * Kills; attempt++)
        {
            var batch = new ClaimBatch($"CRASH-I{attempt:D2}-", BatchSize);
            batches.Add(batch);
            var at = window * random.NextDouble();
            var post = batch.PostAsync(http, app.BaseUrl, template.ApiKey);
            await Task.Delay(at);
            var midway = !post.IsCompleted;
            await app.KillAsync();
            try { await post; } catch (HttpRequestException) { /* the connection died with the app */ }
            if (midway) killed++;
            await app.StartAsync();

            var (claims, scored) = batch.Stored(store);
            output.WriteLine($"kill {attempt} at {at.TotalSeconds:0.000} s: {(midway ? "mid-import" : "after the import had answered")}; afterwards {claims} of {BatchSize} claims stored");
            Assert.Equal("ok", store.IntegrityCheck());
            Assert.Equal(0, store.ForeignKeyViolations());
            Assert.True(claims is 0 or BatchSize, $"batch {batch.Prefix} is half stored: {claims} of {BatchSize} claims (kill at {at.TotalSeconds:0.000} s, seed {Seed})");
            Assert.Equal(claims, scored);
            // What was stored before stays stored.
            Assert.All(batches.SkipLast(1), b => Assert.True(b.Stored(store).Claims is 0 or BatchSize));
        }
        Assert.True(killed >= Kills, $"only {killed} kills landed mid-import");

        // Sending every batch again completes what a kill undid and stores nothing twice.
        foreach (var b in batches)
        {
            var before = b.Stored(store).Claims;
            Assert.Equal(BatchSize - before, await StoredAsync(await b.PostAsync(http, app.BaseUrl, template.ApiKey)));
            Assert.Equal((BatchSize, BatchSize), b.Stored(store));
        }
        Assert.Equal("ok", store.IntegrityCheck());
    }

    [Fact]
    public async Task Killed_in_the_middle_of_retrains_every_registered_model_is_whole_and_retrain_runs_again()
    {
        var random = new Random(Seed + 1);
        output.WriteLine($"seed {Seed + 1}");
        var folder = template.NewDataFolder();
        var store = new StoreOnDisk(folder);
        await using var app = AppProcess.On(folder, template.Settings);
        await app.StartAsync();
        using var http = new HttpClient { Timeout = TimeSpan.FromMinutes(3) };
        string[] retrain = ["retrain", "--trees", "40", "--leaves", "16"];

        var clock = Stopwatch.StartNew();
        await CliProcess.RunAsync(folder, template.Settings, retrain);
        var window = clock.Elapsed;
        output.WriteLine($"a whole retrain took {window.TotalSeconds:0.00} s");
        Assert.Equal(["v1", "v2"], store.Registry().Select(r => r.Version));

        var killed = 0;
        for (var attempt = 1; killed < Kills && attempt <= 2 * Kills; attempt++)
        {
            // Two moments in three anywhere in the run; every third one within 300 ms after the retrain says it is
            // saving, where the file is written, renamed and registered (a window too short for a draw over the run).
            var atSave = attempt % 3 == 0;
            var at = atSave ? TimeSpan.FromMilliseconds(300 * random.NextDouble()) : window * random.NextDouble();
            using var cli = CliProcess.Start(folder, template.Settings, retrain);
            if (atSave) await cli.WaitForErrorLineAsync(SavingStage);
            await Task.Delay(at);
            // The whole app goes down at once, as on a crash of the server: the retrain and the web app.
            var midway = await cli.KillAsync();
            await app.KillAsync();
            if (midway) killed++;
            output.WriteLine($"kill {attempt} at {at.TotalSeconds:0.000} s{(atSave ? $" after '{SavingStage}'" : "")}: {(midway ? "mid-retrain" : $"after the retrain ended (exit {cli.ExitCode})")}; " +
                $"last stage: {cli.Errors.Trim().Split('\n')[^1]}");
            await app.StartAsync();
            await CheckModelsAsync(store, app, http, $"CRASH-R{attempt:D2}-", $"kill {attempt} at {at.TotalSeconds:0.000} s, seed {Seed + 1}");
        }
        Assert.True(killed >= Kills, $"only {killed} kills landed mid-retrain");

        // A retrain runs to its end again: nothing is left stuck, and what the kills left behind is cleared.
        var before = store.Registry().Count;
        await CliProcess.RunAsync(folder, template.Settings, retrain);
        Assert.Equal(before + 1, store.Registry().Count);
        await CheckModelsAsync(store, app, http, "CRASH-R99-", "after the last retrain");
        var registered = store.Registry().Select(r => Path.GetFileName(r.FilePath)).Order();
        Assert.Equal(registered, Directory.GetFiles(store.ModelsFolder).Select(Path.GetFileName).Order());
    }

    /// <summary>
    /// Whole store, whole registered files, files of no registered version only under the name the next
    /// retrain takes (and clears), and the serving model scores a claim sent to the restarted app exactly
    /// as its file does.
    /// </summary>
    private async Task CheckModelsAsync(StoreOnDisk store, AppProcess app, HttpClient http, string prefix, string when)
    {
        Assert.Equal("ok", store.IntegrityCheck());
        Assert.Equal(0, store.ForeignKeyViolations());
        var problems = store.RegistryProblems();
        Assert.True(problems.Count == 0, $"{when}: {string.Join(" ", problems)}");

        var rows = store.Registry();
        var next = $"v{rows.Max(r => int.Parse(r.Version[1..], CultureInfo.InvariantCulture)) + 1}.model";
        var registered = rows.Select(r => Path.GetFileName(r.FilePath)).ToHashSet();
        var strays = Directory.GetFiles(store.ModelsFolder).Select(Path.GetFileName)
            .Where(f => !registered.Contains(f!) && f != next && !(f!.StartsWith($".{next}.") && f.EndsWith(".tmp"))).ToList();
        Assert.True(strays.Count == 0, $"{when}: files of no registered version: {string.Join(", ", strays)}");

        var claim = new ClaimBatch(prefix, 1);
        Assert.Equal(1, await StoredAsync(await claim.PostAsync(http, app.BaseUrl, template.ApiKey)));
        var serving = rows.Single(r => r.IsServing);
        var expected = ScoringModel.Load(store.ServingFile()).Probability(claim.First);
        var scoredBy = store.Scalar("SELECT COUNT(*) FROM ClaimScores s JOIN Claims c ON c.Id = s.ClaimId WHERE c.ClaimNumber = $n AND s.ModelVersion = $v AND abs(s.Probability - $p) < 1e-9",
            ("$n", prefix + "00001"), ("$v", serving.Version), ("$p", expected));
        Assert.True(scoredBy == 1, $"{when}: the claim was not scored by {serving.Version} as its file scores it ({expected})");
    }

    private static async Task<int> StoredAsync(HttpResponseMessage response)
    {
        var body = await response.Content.ReadAsStringAsync();
        Assert.True(response.StatusCode == HttpStatusCode.OK, $"{(int)response.StatusCode}: {body}");
        return JsonDocument.Parse(body).RootElement.GetProperty("stored").GetInt32();
    }
}
