using System.Diagnostics;
using System.Globalization;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.Store;

namespace Triage.Bench.Queue;

/// <summary>
/// `queue`: the first page of one investigator's open cases on one line, riskiest first, over a SQLite
/// store of 1,000,000 cases — through <see cref="QueueService"/> (EF Core) and as hand-written SQL
/// through Microsoft.Data.Sqlite. Prints p50/p95 of each and their ratio. Targets: p95 ≤ 20 ms, ratio ≤ 1.5.
/// Shapes: by assignee and line, by assignee, by line; then each other filter and sort (page + total count, EF Core only). Options: --cases N (1000000), --runs N (1000), --file PATH (kept and reused when it already holds N cases).
/// </summary>
public static class QueueBenchmark
{
    private const int PageSize = 50;
    private static readonly Actor Lead = new("bench-lead", "bench-lead", new HashSet<string> { Roles.TeamLead });

    public static async Task RunAsync(string[] args)
    {
        var cases = Option(args, "--cases", 1_000_000);
        var runs = Option(args, "--runs", 1000);
        var file = OptionText(args, "--file") ?? Path.Combine(Path.GetTempPath(), $"triage-bench-queue-{cases}-drivers.db");
        var connection = $"Data Source={file}";

        await QueueData.EnsureAsync(file, cases);
        var options = new DbContextOptionsBuilder<SqliteTriageDbContext>().UseSqlite(connection).Options;
        await using var db = new SqliteTriageDbContext(options);
        var service = new QueueService(db);
        await using var raw = new SqliteConnection(connection);
        await raw.OpenAsync();
        Console.WriteLine($"queue: {cases:N0} cases, {QueueData.Investigators} investigators, {runs} runs a shape, first page of {PageSize}, riskiest first");

        var met = true;
        foreach (var shape in Shapes)
        {
            var random = new Random(5);
            var queries = Enumerable.Range(0, runs).Select(_ => shape.Query(random)).ToArray();
            await using var command = RawCommand(raw, shape.Where);

            // Both must read the same rows, so the timing compares like with like.
            var efRows = await service.PageRowsAsync(queries[0].Actor, queries[0].Query);
            var rawRows = await RawAsync(command, queries[0]);
            if (efRows.Count == 0 || !efRows.SequenceEqual(rawRows))
                throw new InvalidOperationException($"{shape.Name}: EF Core and hand-written SQL disagree ({efRows.Count} vs {rawRows.Count} rows).");

            // Interleaved, so both see the same background load on a shared machine.
            var (ef, sql) = await TimePairAsync(queries, async q => (await service.PageRowsAsync(q.Actor, q.Query)).Count, async q => (await RawAsync(command, q)).Count);
            var (withCount, _) = await TimePairAsync(queries, async q => (await service.GetPageAsync(q.Actor, q.Query)).Rows.Count, _ => Task.FromResult(0));
            var ratio = ef.P95 / sql.P95;
            met &= ef.P95 <= 20 && ratio <= 1.5;

            Console.WriteLine();
            Console.WriteLine($"{shape.Name}; plan: {string.Join(" | ", await PlanAsync(raw, shape.Where, queries[0]))}");
            Print("EF Core (QueueService page)", ef);
            Print("hand-written SQL", sql);
            Print("EF Core page + total count", withCount);
            Console.WriteLine($"ratio EF/SQL: p95 {ratio:0.00}, p50 {ef.P50 / sql.P50:0.00}");
        }
        Console.WriteLine();
        Console.WriteLine($"target p95 ≤ 20 ms and ratio ≤ 1.5 on every shape: {(met ? "met" : "NOT met")}");

        // The other filters and sorts have no hand-written twin: their first page with its total count, timed alone.
        var filterRuns = Math.Max(20, runs / 10);
        Console.WriteLine();
        Console.WriteLine($"filters and sorts, first page + total count through QueueService, {filterRuns} runs each (target p95 well under 1000 ms):");
        var worst = 0.0;
        foreach (var shape in FilterShapes)
        {
            var random = new Random(9);
            var queries = Enumerable.Range(0, filterRuns).Select(_ => shape.Query(random)).ToArray();
            var (timing, _) = await TimePairAsync(queries, async q => (await service.GetPageAsync(q.Actor, q.Query)).Rows.Count, _ => Task.FromResult(0));
            worst = Math.Max(worst, timing.P95);
            Print(shape.Name, timing);
        }
        Console.WriteLine($"slowest p95 {worst.ToString("0.0", CultureInfo.InvariantCulture)} ms");
    }

    private static readonly FilterShape[] FilterShapes =
    [
        new("lead: by due date", _ => new Request(Lead, new QueueQuery(Sort: QueueSort.DueDate, Descending: false, PageSize: PageSize))),
        new("lead: by amount", _ => new Request(Lead, new QueueQuery(Sort: QueueSort.Amount, PageSize: PageSize))),
        new("lead: oldest first", _ => new Request(Lead, new QueueQuery(Sort: QueueSort.Received, Descending: false, PageSize: PageSize))),
        new("investigator: mine + unassigned", r => new Request(Investigator(r), new QueueQuery(PageSize: PageSize))),
        new("lead: status New", _ => new Request(Lead, new QueueQuery(Status: CaseStatus.New, PageSize: PageSize))),
        new("lead: received in one week", OneWeek),
        new("lead: common driver", _ => new Request(Lead, new QueueQuery(DriverField: QueueData.DriverFields[0].Field, PageSize: PageSize))),
        new("lead: rare driver", _ => new Request(Lead, new QueueQuery(DriverField: QueueData.DriverFields[^1].Field, PageSize: PageSize))),
        new("lead: claim number", r => new Request(Lead, new QueueQuery(ClaimNumber: $"B-{r.Next(1, 1_000_000):D8}", PageSize: PageSize))),
    ];

    private static Request OneWeek(Random r)
    {
        var from = new DateTime(2024, 1, 1, 0, 0, 0, DateTimeKind.Utc).AddDays(r.Next(990));
        return new Request(Lead, new QueueQuery(ReceivedFrom: from, ReceivedTo: from.AddDays(6), PageSize: PageSize));
    }

    private sealed record Request(Actor Actor, QueueQuery Query);

    private sealed record Shape(string Name, Func<Random, Request> Query, string Where);

    private sealed record FilterShape(string Name, Func<Random, Request> Query);

    private static Actor Investigator(Random r) => QueueData.Investigator(r.Next(QueueData.Investigators));

    private static readonly Shape[] Shapes =
    [
        new("by assignee and line", r => new Request(Investigator(r), new QueueQuery(QueueView.Mine,
            QueueData.Lines[r.Next(QueueData.Lines.Length)], PageSize: PageSize)),
            "c.\"AssigneeId\" = $assignee AND c.\"IsOpen\" AND c.\"Line\" = $line"),
        new("by assignee", r => new Request(Investigator(r), new QueueQuery(QueueView.Mine, PageSize: PageSize)),
            "c.\"AssigneeId\" = $assignee AND c.\"IsOpen\""),
        new("by line", r => new Request(Lead, new QueueQuery(QueueView.AllOpen, QueueData.Lines[r.Next(QueueData.Lines.Length)], PageSize: PageSize)),
            "c.\"IsOpen\" AND c.\"Line\" = $line"),
    ];

    private static SqliteCommand RawCommand(SqliteConnection raw, string where)
    {
        var command = raw.CreateCommand();
        command.CommandText = $"""
            SELECT c."Id", c."ClaimNumber", c."Line", c."ClaimedAmount", c."Probability", c."RiskScore", c."TopDriver1",
                   c."TopDriver2", c."ReceivedDate", c."DueDate", c."Status", c."AssigneeName"
            FROM "Cases" AS c
            WHERE {where}
            ORDER BY c."Probability" DESC, c."Id" DESC
            LIMIT $take OFFSET $skip
            """;
        foreach (var name in new[] { "$assignee", "$line" }.Where(where.Contains))
            command.Parameters.Add(name, SqliteType.Text);
        command.Parameters.Add("$take", SqliteType.Integer);
        command.Parameters.Add("$skip", SqliteType.Integer);
        command.Prepare();
        return command;
    }

    private static async Task<List<QueueRow>> RawAsync(SqliteCommand command, Request request)
    {
        var q = request.Query;
        if (command.Parameters.Contains("$assignee")) command.Parameters["$assignee"].Value = request.Actor.UserId;
        if (command.Parameters.Contains("$line")) command.Parameters["$line"].Value = q.Line;
        command.Parameters["$take"].Value = q.PageSize;
        command.Parameters["$skip"].Value = q.Page * q.PageSize;
        var rows = new List<QueueRow>(q.PageSize);
        await using var r = await command.ExecuteReaderAsync();
        while (await r.ReadAsync())
            rows.Add(new QueueRow(r.GetInt32(0), r.GetString(1), r.GetString(2), r.GetDouble(3), r.GetDouble(4), r.GetInt32(5),
                r.IsDBNull(6) ? null : r.GetString(6), r.IsDBNull(7) ? null : r.GetString(7),
                DateTime.SpecifyKind(r.GetDateTime(8), DateTimeKind.Utc), DateTime.SpecifyKind(r.GetDateTime(9), DateTimeKind.Utc),
                Enum.Parse<CaseStatus>(r.GetString(10)), r.IsDBNull(11) ? null : r.GetString(11)));
        return rows;
    }

    private static async Task<List<string>> PlanAsync(SqliteConnection raw, string where, Request q)
    {
        await using var explain = raw.CreateCommand();
        explain.CommandText = $"""EXPLAIN QUERY PLAN SELECT c."Id" FROM "Cases" AS c WHERE {where} ORDER BY c."Probability" DESC, c."Id" DESC LIMIT 50""";
        if (where.Contains("$assignee")) explain.Parameters.AddWithValue("$assignee", q.Actor.UserId);
        if (where.Contains("$line")) explain.Parameters.AddWithValue("$line", q.Query.Line);
        var steps = new List<string>();
        await using var r = await explain.ExecuteReaderAsync();
        while (await r.ReadAsync()) steps.Add(r.GetString(3));
        return steps;
    }

    private sealed record Timing(double P50, double P95);

    private static async Task<(Timing A, Timing B)> TimePairAsync(Request[] queries, Func<Request, Task<int>> a, Func<Request, Task<int>> b)
    {
        // Warm up for two seconds: tiered JIT promotes hot methods only after a delay; also EF's model,
        // the compiled queries and SQLite's page cache.
        var warm = Stopwatch.StartNew();
        for (var i = 0; warm.Elapsed < TimeSpan.FromSeconds(2); i++) { await a(queries[i % queries.Length]); await b(queries[i % queries.Length]); }
        GC.Collect();
        var msA = new double[queries.Length];
        var msB = new double[queries.Length];
        for (var i = 0; i < queries.Length; i++)
        {
            msA[i] = await Measure(a, queries[i]);
            msB[i] = await Measure(b, queries[i]);
        }
        return (Summarise(msA), Summarise(msB));
    }

    private static async Task<double> Measure(Func<Request, Task<int>> run, Request q)
    {
        var start = Stopwatch.GetTimestamp();
        if (await run(q) < 0) throw new InvalidOperationException("unreachable");
        return Stopwatch.GetElapsedTime(start).TotalMilliseconds;
    }

    private static Timing Summarise(double[] ms)
    {
        Array.Sort(ms);
        return new Timing(Percentile(ms, 0.50), Percentile(ms, 0.95));
    }

    // Nearest-rank percentile on sorted samples.
    private static double Percentile(double[] sorted, double p) => sorted[Math.Clamp((int)Math.Ceiling(p * sorted.Length) - 1, 0, sorted.Length - 1)];

    private static void Print(string what, Timing t) =>
        Console.WriteLine($"{what,-30} p50 {t.P50.ToString("0.000", CultureInfo.InvariantCulture),8} ms   p95 {t.P95.ToString("0.000", CultureInfo.InvariantCulture),8} ms");

    private static int Option(string[] args, string name, int fallback) =>
        OptionText(args, name) is { } v ? int.Parse(v, CultureInfo.InvariantCulture) : fallback;

    private static string? OptionText(string[] args, string name)
    {
        var i = Array.IndexOf(args, name);
        return i >= 0 && i + 1 < args.Length ? args[i + 1] : null;
    }
}
