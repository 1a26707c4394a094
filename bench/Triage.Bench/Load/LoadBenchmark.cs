using System.Diagnostics;
using System.Net;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Triage.Bench.Intake;
using Triage.Cases;
using Triage.Cases.ApiKeys;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Scoring.Schema;

namespace Triage.Bench.Load;

/// <summary>
/// `load`: the app as a child process on loopback after first start on the demo scenario. 50 intake
/// clients, each with its own API key, send 20,000 new claims in total as CSV batches while simulated
/// investigators page the queue and open cases. Prints throughput and p50/p95/p99 per operation, then
/// checks nothing failed, nothing was stored twice and nothing is missing (exit 1 otherwise). Then opens
/// 100 Blazor circuits in headless Chromium and prints the app's resident memory per circuit.
/// Options: --claims N (20000) --clients N (50) --batch N (50) --investigators N (8) --circuits N (100).
/// </summary>
internal static partial class LoadBenchmark
{
    private const string Prefix = "LOAD-";

    public static async Task<int> RunAsync(string[] args)
    {
        var o = LoadOptions.Parse(args);
        Console.WriteLine($"load: starting the app (first start on the demo scenario, not timed), {Environment.ProcessorCount} cores...");
        // Limits raised so the load measures the app, not its request limiter.
        await using var app = await AppUnderLoad.StartAsync(new Dictionary<string, string>
        {
            ["Security__ApiRequestsPerMinute"] = "1000000",
            ["Security__SignInAttemptsPerMinute"] = "10000",
        });
        var keys = await CreateKeysAsync(app, o.Clients);
        var schema = ClaimSchema.Load(Path.Combine(app.RepoRoot, "seed-cases", "schema.json"));
        var batches = Batches(schema, o);
        var (password, investigators) = DemoInvestigators(app.RepoRoot);
        var latencies = new Latencies();
        Console.WriteLine($"load: {o.Claims:N0} claims in {batches.Sum(b => b.Count):N0} requests from {o.Clients} clients; {o.Investigators} investigators paging the queue");

        using var stop = new CancellationTokenSource();
        var watch = Stopwatch.StartNew();
        var readers = Enumerable.Range(0, o.Investigators)
            .Select(i => investigators[i % investigators.Count])
            .Select(user => InvestigatorAsync(app.BaseUrl, user, password, OpenableCases(app, user), latencies, stop.Token)).ToList();
        var senders = Enumerable.Range(0, o.Clients).Select(c => SenderAsync(app.BaseUrl, keys[c], batches[c], latencies)).ToList();
        var sent = await Task.WhenAll(senders);
        var intakeWall = watch.Elapsed;
        await stop.CancelAsync();
        await Task.WhenAll(readers);

        Console.WriteLine($"intake wall time {intakeWall.TotalSeconds:0.0} s: {o.Claims / intakeWall.TotalSeconds:N0} claims/s with the investigators working");
        latencies.Print(intakeWall);
        var failed = Verify(app, o, sent.Sum(s => s.Stored), sent.Sum(s => s.Duplicates), latencies);

        var perCircuit = await CircuitMemory.MeasureAsync(app, investigators[0], password, o.Circuits);
        Console.WriteLine($"circuits: {o.Circuits} open, {perCircuit.TotalBefore / 1e6:0} MB → {perCircuit.TotalAfter / 1e6:0} MB resident; {perCircuit.PerCircuit / 1e3:0} kB per circuit");
        return failed ? 1 : 0;
    }

    /// <summary>Each client's share of the claims, as CSV bodies of at most <c>Batch</c> rows.</summary>
    private static List<List<string>> Batches(ClaimSchema schema, LoadOptions o)
    {
        var header = schema.Fields.Select(f => f.Name).ToArray();
        var rows = BenchClaims.Generate(schema, o.Claims, seed: 17).Select((claim, i) =>
        {
            claim["claim_number"] = $"{Prefix}{i + 1:D7}";
            return string.Join(',', header.Select(h => claim[h] ?? ""));
        }).ToList();
        var line = string.Join(',', header) + "\n";
        return Enumerable.Range(0, o.Clients)
            .Select(c => rows.Where((_, i) => i % o.Clients == c).Chunk(o.Batch).Select(b => line + string.Join("\n", b) + "\n").ToList())
            .ToList();
    }

    private static async Task<(int Stored, int Duplicates)> SenderAsync(Uri baseUrl, string key, List<string> bodies, Latencies latencies)
    {
        using var http = new HttpClient { BaseAddress = baseUrl, Timeout = TimeSpan.FromMinutes(5) };
        http.DefaultRequestHeaders.Add("X-Api-Key", key);
        int stored = 0, duplicates = 0;
        foreach (var body in bodies)
        {
            using var response = await latencies.TimeAsync("intake POST /api/claims", () =>
                http.PostAsync("/api/claims", new StringContent(body, Encoding.UTF8, "text/csv")));
            var text = await response.Content.ReadAsStringAsync();
            if (response.StatusCode != HttpStatusCode.OK) { latencies.Fail("intake", $"{(int)response.StatusCode}: {text[..Math.Min(300, text.Length)]}"); continue; }
            var report = JsonDocument.Parse(text).RootElement;
            stored += report.GetProperty("stored").GetInt32();
            duplicates += report.GetProperty("duplicates").GetInt32();
        }
        return (stored, duplicates);
    }

    /// <summary>Signs in like a browser, then pages the queue and opens a case from it, until told to stop.</summary>
    private static async Task InvestigatorAsync(Uri baseUrl, string user, string password, IReadOnlyList<int> caseIds, Latencies latencies, CancellationToken stop)
    {
        using var handler = new HttpClientHandler { CookieContainer = new CookieContainer(), AllowAutoRedirect = false };
        using var http = new HttpClient(handler) { BaseAddress = baseUrl, Timeout = TimeSpan.FromMinutes(2) };
        var form = await http.GetStringAsync("/signin");
        var token = WebUtility.HtmlDecode(Token().Match(form).Groups[1].Value);
        var signIn = await latencies.TimeAsync("sign in", () => http.PostAsync("/account/signin", new FormUrlEncodedContent(new Dictionary<string, string>
        {
            ["UserName"] = user, ["Password"] = password, ["ReturnUrl"] = "/", ["__RequestVerificationToken"] = token,
        })));
        if (signIn.StatusCode != HttpStatusCode.Redirect || signIn.Headers.Location?.OriginalString != "/") { latencies.Fail("sign in", $"{user}: {signIn.StatusCode}"); return; }
        var random = new Random(user.GetHashCode());
        while (!stop.IsCancellationRequested)
        {
            var queue = await latencies.TimeAsync("queue page GET /", () => http.GetAsync("/", CancellationToken.None));
            if (queue.StatusCode != HttpStatusCode.OK) { latencies.Fail("queue page", $"{queue.StatusCode}"); continue; }
            var id = caseIds[random.Next(caseIds.Count)];
            var page = await latencies.TimeAsync("case page GET /cases/{id}", () => http.GetAsync($"/cases/{id}", CancellationToken.None));
            if (page.StatusCode != HttpStatusCode.OK) latencies.Fail("case page", $"/cases/{id}: {page.StatusCode}");
        }
    }

    /// <summary>
    /// Cases the investigator may open: their own and unassigned ones, read from the store. (The queue
    /// grid loads its rows over the circuit, so the prerendered page holds no links to follow.)
    /// </summary>
    private static List<int> OpenableCases(AppUnderLoad app, string user)
    {
        using var db = new SqliteConnection($"Data Source={Path.Combine(app.DataFolder, "triage.db")};Mode=ReadOnly;Pooling=False");
        db.Open();
        using var cmd = db.CreateCommand();
        cmd.CommandText = "SELECT c.Id FROM Cases c LEFT JOIN AspNetUsers u ON u.Id = c.AssigneeId WHERE c.IsOpen AND (c.AssigneeId IS NULL OR u.UserName = $u)";
        cmd.Parameters.AddWithValue("$u", user);
        using var r = cmd.ExecuteReader();
        var ids = new List<int>();
        while (r.Read()) ids.Add(r.GetInt32(0));
        return ids.Count > 0 ? ids : throw new InvalidOperationException($"{user} has no case to open.");
    }

    /// <summary>Counts in the store itself: every claim once, each with one score, and every request answered.</summary>
    private static bool Verify(AppUnderLoad app, LoadOptions o, int reportedStored, int reportedDuplicates, Latencies latencies)
    {
        using var db = new SqliteConnection($"Data Source={Path.Combine(app.DataFolder, "triage.db")};Mode=ReadOnly;Pooling=False");
        db.Open();
        long Count(string sql)
        {
            using var cmd = db.CreateCommand();
            cmd.CommandText = sql;
            cmd.Parameters.AddWithValue("$p", Prefix + "%");
            return (long)cmd.ExecuteScalar()!;
        }
        var claims = Count("SELECT COUNT(*) FROM Claims WHERE ClaimNumber LIKE $p");
        var distinct = Count("SELECT COUNT(DISTINCT ClaimNumber) FROM Claims WHERE ClaimNumber LIKE $p");
        var scores = Count("SELECT COUNT(*) FROM ClaimScores s JOIN Claims c ON c.Id = s.ClaimId WHERE c.ClaimNumber LIKE $p");
        var cases = Count("SELECT COUNT(*) FROM Cases WHERE ClaimNumber LIKE $p");
        Console.WriteLine($"store: {claims:N0} claims ({distinct:N0} distinct), {scores:N0} scores, {cases:N0} cases opened; reported stored {reportedStored:N0}, duplicates {reportedDuplicates:N0}; failures {latencies.Failures.Count}");
        foreach (var f in latencies.Failures.Take(10)) Console.WriteLine($"  FAILED {f}");
        var ok = latencies.Failures.Count == 0 && claims == o.Claims && distinct == o.Claims && scores == o.Claims
                 && reportedStored == o.Claims && reportedDuplicates == 0;
        Console.WriteLine(ok ? "checks passed: nothing failed, nothing duplicated, nothing lost" : "CHECKS FAILED");
        return !ok;
    }

    /// <summary>One intake key per client, issued through the same service the admin page uses, on the app's store.</summary>
    private static async Task<List<string>> CreateKeysAsync(AppUnderLoad app, int count)
    {
        var b = Host.CreateApplicationBuilder();
        b.Configuration.AddTriageSettings("Production");
        b.Configuration.AddInMemoryCollection(new Dictionary<string, string?>
        {
            ["Storage:DataFolder"] = app.DataFolder,
            ["Logging:LogLevel:Default"] = "Warning",
        });
        b.AddTriageCases();
        using var host = b.Build();
        var admin = new Actor("bench", "bench-admin", new HashSet<string> { Roles.Admin });
        var keys = new List<string>();
        for (var i = 0; i < count; i++)
        {
            await using var scope = host.Services.CreateAsyncScope();
            keys.Add((await scope.ServiceProvider.GetRequiredService<ApiKeyService>().CreateAsync($"load client {i + 1}", admin)).Secret);
        }
        SqliteConnection.ClearAllPools();
        return keys;
    }

    private static (string Password, List<string> Investigators) DemoInvestigators(string root)
    {
        var settings = new ConfigurationBuilder().AddJsonFile(Path.Combine(root, "appsettings.json")).Build();
        using var team = JsonDocument.Parse(File.ReadAllText(Path.Combine(root, "seed-cases", "team.json")));
        var people = team.RootElement.GetProperty("people").EnumerateArray()
            .Where(p => p.GetProperty("roles").EnumerateArray().Any(r => r.GetString() == Roles.Investigator))
            .Select(p => p.GetProperty("userName").GetString()!).ToList();
        return (settings["Demo:Password"]!, people);
    }

    [GeneratedRegex("name=\"__RequestVerificationToken\" value=\"([^\"]+)\"")]
    private static partial Regex Token();

}

internal sealed record LoadOptions(int Claims, int Clients, int Batch, int Investigators, int Circuits)
{
    public static LoadOptions Parse(string[] args)
    {
        int Get(string name, int fallback)
        {
            var i = Array.IndexOf(args, name);
            return i >= 0 && i + 1 < args.Length ? int.Parse(args[i + 1]) : fallback;
        }
        return new LoadOptions(Get("--claims", 20_000), Get("--clients", 50), Get("--batch", 50), Get("--investigators", 8), Get("--circuits", 100));
    }
}
