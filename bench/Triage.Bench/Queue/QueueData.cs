using System.Diagnostics;
using System.Globalization;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Bench.Queue;

/// <summary>Builds the benchmark store: the real migrated schema, filled with raw inserts in one transaction.</summary>
internal static class QueueData
{
    public const int Investigators = 40;
    public static readonly string[] Lines = ["motor", "home", "travel"];
    // Share of cases still open; the rest are closed history that the queue must skip.
    private const double OpenShare = 0.3;
    // Each case gets two raising drivers from these fields, the first picked with a skewed weight so some
    // fields are common and some rare, as in the demo.
    public static readonly (string Field, string Name)[] DriverFields =
    [
        ("policy_age_days", "Days from policy start to loss"), ("claimed_amount", "Amount claimed"),
        ("report_delay_days", "Days from loss to report"), ("repairer_code", "Repairer"),
        ("cover_raised_days_before_loss", "Cover raised before loss"), ("amount_to_limit", "Amount as share of limit"),
        ("loss_hour", "Hour of loss"), ("vehicle_age_years", "Vehicle age"),
    ];

    public static string UserId(int i) => $"bench-user-{i:D2}";
    public static Actor Investigator(int i) => new(UserId(i), $"bench{i:D2}", new HashSet<string> { Roles.Investigator });
    private static string DisplayName(int i) => $"Bench Investigator {i:D2}";

    public static async Task EnsureAsync(string file, int cases)
    {
        if (File.Exists(file) && await CountAsync(file) == cases) return;
        foreach (var f in new[] { file, file + "-wal", file + "-shm" }) File.Delete(f);
        var watch = Stopwatch.StartNew();
        var options = new DbContextOptionsBuilder<SqliteTriageDbContext>().UseSqlite($"Data Source={file}").Options;
        await using (var db = new SqliteTriageDbContext(options)) await db.Database.MigrateAsync();

        await using var c = new SqliteConnection($"Data Source={file}");
        await c.OpenAsync();
        await Exec(c, "PRAGMA synchronous = OFF");
        await Exec(c, "PRAGMA cache_size = -262144");
        await using var tx = c.BeginTransaction();
        await InsertUsers(c, tx);
        await InsertCases(c, tx, cases);
        await tx.CommitAsync();
        await Exec(c, "ANALYZE");
        Console.WriteLine($"queue: generated {cases:N0} cases in {watch.Elapsed.TotalSeconds:0.0} s ({file})");
    }

    private static async Task<long> CountAsync(string file)
    {
        try
        {
            await using var c = new SqliteConnection($"Data Source={file};Mode=ReadOnly");
            await c.OpenAsync();
            await using var cmd = c.CreateCommand();
            cmd.CommandText = "SELECT count(*) FROM \"Cases\"";
            return (long)(await cmd.ExecuteScalarAsync())!;
        }
        catch (SqliteException)
        {
            return -1;
        }
    }

    private static async Task InsertUsers(SqliteConnection c, SqliteTransaction tx)
    {
        await using var cmd = c.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = """
            INSERT INTO "AspNetUsers" ("Id","UserName","NormalizedUserName","Email","NormalizedEmail","EmailConfirmed","PhoneNumberConfirmed",
              "TwoFactorEnabled","LockoutEnabled","AccessFailedCount","DisplayName","Lines","DailyCapacity")
            VALUES ($id,$name,upper($name),$name||'@bench.example',upper($name||'@bench.example'),1,0,0,1,0,$display,'motor,home,travel',8)
            """;
        var id = cmd.Parameters.Add("$id", SqliteType.Text);
        var name = cmd.Parameters.Add("$name", SqliteType.Text);
        var display = cmd.Parameters.Add("$display", SqliteType.Text);
        for (var i = 0; i < Investigators; i++)
        {
            id.Value = UserId(i);
            name.Value = $"bench{i:D2}";
            display.Value = DisplayName(i);
            await cmd.ExecuteNonQueryAsync();
        }
    }

    private static async Task InsertCases(SqliteConnection c, SqliteTransaction tx, int count)
    {
        await using var claim = c.CreateCommand();
        claim.Transaction = tx;
        claim.CommandText = """
            INSERT INTO "Claims" ("Id","ClaimNumber","Line","ReportDate","ClaimedAmount","FieldValuesJson","State")
            VALUES ($id,$number,$line,$date,$amount,'{}',$state)
            """;
        var cId = claim.Parameters.Add("$id", SqliteType.Integer);
        var cNumber = claim.Parameters.Add("$number", SqliteType.Text);
        var cLine = claim.Parameters.Add("$line", SqliteType.Text);
        var cDate = claim.Parameters.Add("$date", SqliteType.Text);
        var cAmount = claim.Parameters.Add("$amount", SqliteType.Real);
        var cState = claim.Parameters.Add("$state", SqliteType.Text);
        claim.Prepare();

        await using var kase = c.CreateCommand();
        kase.Transaction = tx;
        kase.CommandText = """
            INSERT INTO "Cases" ("Id","ClaimId","Status","IsOpen","Probability","RiskScore","LogOdds","BaseLogOdds","ModelVersion",
              "ScoredValuesJson","AssigneeId","OpenedAt","DueDate","Version","ClaimNumber","Line","ClaimedAmount","ReceivedDate",
              "TopDriver1","TopDriver2","AssigneeName")
            VALUES ($id,$id,$status,$open,$p,$score,$lo,-2.5,'bench','{}',$assignee,$date,$due,$version,$number,$line,$amount,$date,
              $top1,$top2,$name)
            """;
        var id = kase.Parameters.Add("$id", SqliteType.Integer);
        var status = kase.Parameters.Add("$status", SqliteType.Text);
        var open = kase.Parameters.Add("$open", SqliteType.Integer);
        var p = kase.Parameters.Add("$p", SqliteType.Real);
        var score = kase.Parameters.Add("$score", SqliteType.Integer);
        var lo = kase.Parameters.Add("$lo", SqliteType.Real);
        var assignee = kase.Parameters.Add("$assignee", SqliteType.Text);
        var date = kase.Parameters.Add("$date", SqliteType.Text);
        var due = kase.Parameters.Add("$due", SqliteType.Text);
        var version = kase.Parameters.Add("$version", SqliteType.Text);
        var number = kase.Parameters.Add("$number", SqliteType.Text);
        var line = kase.Parameters.Add("$line", SqliteType.Text);
        var amount = kase.Parameters.Add("$amount", SqliteType.Real);
        var name = kase.Parameters.Add("$name", SqliteType.Text);
        var top1 = kase.Parameters.Add("$top1", SqliteType.Text);
        var top2 = kase.Parameters.Add("$top2", SqliteType.Text);
        kase.Prepare();

        await using var driver = c.CreateCommand();
        driver.Transaction = tx;
        driver.CommandText = """
            INSERT INTO "Drivers" ("CaseId","Rank","Field","DisplayName","ValueText","Contribution","EffectPoints","Comparison")
            VALUES ($case,$rank,$field,$display,'x',$contribution,$contribution*10,'above typical')
            """;
        var dCase = driver.Parameters.Add("$case", SqliteType.Integer);
        var dRank = driver.Parameters.Add("$rank", SqliteType.Integer);
        var dField = driver.Parameters.Add("$field", SqliteType.Text);
        var dDisplay = driver.Parameters.Add("$display", SqliteType.Text);
        var dContribution = driver.Parameters.Add("$contribution", SqliteType.Real);
        driver.Prepare();

        var random = new Random(3);
        var start = new DateTime(2024, 1, 1, 0, 0, 0, DateTimeKind.Utc);
        for (var i = 1; i <= count; i++)
        {
            var isOpen = random.NextDouble() < OpenShare;
            // Most open cases have someone on them; closed ones always had.
            int? who = isOpen && random.NextDouble() < 0.3 ? null : random.Next(Investigators);
            var prob = Math.Round(0.2 + 0.8 * Math.Pow(random.NextDouble(), 2), 6);
            var received = start.AddDays(random.Next(1000));
            var num = $"B-{i:D8}";
            var ln = Lines[random.Next(Lines.Length)];
            var amt = Math.Round(100 + random.NextDouble() * 30_000, 2);

            cId.Value = i; cNumber.Value = num; cLine.Value = ln; cDate.Value = Sql(received); cAmount.Value = amt;
            cState.Value = isOpen ? "Open" : "Closed";
            await claim.ExecuteNonQueryAsync();

            id.Value = i;
            status.Value = isOpen ? (who is null ? "New" : "Assigned") : "Closed";
            open.Value = isOpen ? 1 : 0;
            p.Value = prob;
            score.Value = (int)Math.Round(prob * 100);
            lo.Value = Math.Log(prob / (1 - prob + 1e-9));
            assignee.Value = who is { } w ? UserId(w) : DBNull.Value;
            name.Value = who is { } n ? DisplayName(n) : DBNull.Value;
            date.Value = Sql(received);
            due.Value = Sql(received.AddDays(10));
            version.Value = Guid.NewGuid().ToString().ToUpperInvariant();
            number.Value = num; line.Value = ln; amount.Value = amt;
            var first = (int)(DriverFields.Length * Math.Pow(random.NextDouble(), 2));
            var second = (first + 1 + random.Next(DriverFields.Length - 1)) % DriverFields.Length;
            top1.Value = DriverFields[first].Name; top2.Value = DriverFields[second].Name;
            await kase.ExecuteNonQueryAsync();

            dCase.Value = i;
            foreach (var (rank, f) in new[] { (1, first), (2, second) })
            {
                dRank.Value = rank; dField.Value = DriverFields[f].Field; dDisplay.Value = DriverFields[f].Name;
                dContribution.Value = 1.0 / rank;
                await driver.ExecuteNonQueryAsync();
            }
        }
    }

    // The text form EF Core's SQLite provider writes for DateTime.
    private static string Sql(DateTime d) => d.ToString("yyyy-MM-dd HH:mm:ss", CultureInfo.InvariantCulture);

    private static async Task Exec(SqliteConnection c, string sql)
    {
        await using var cmd = c.CreateCommand();
        cmd.CommandText = sql;
        await cmd.ExecuteNonQueryAsync();
    }
}
