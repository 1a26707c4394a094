using System.CommandLine;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Support;
using Triage.Cli.Backup;
using Triage.Cli.Import;

namespace Triage.Cli.Tests.Backup;

/// <summary>backup and restore run in-process over a temp store seeded with the tiny scenario.</summary>
[Collection(Triage.Cli.Tests.Support.ConsoleCollection.Name)]
public sealed class BackupCommandTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("triage-backup-").FullName;

    public BackupCommandTests() => TinySeed.Write(Path.Combine(_dir, "seed"), historyRows: 300, openRows: 20);

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(_dir, recursive: true);
    }

    private void Configure(IConfigurationBuilder c) => c.AddInMemoryCollection(new Dictionary<string, string?>
    {
        ["Storage:Provider"] = "Sqlite",
        ["Storage:DataFolder"] = Path.Combine(_dir, "data"),
        ["Demo:Enabled"] = "false",
        ["Demo:SeedFolder"] = Path.Combine(_dir, "seed"),
        ["Scoring:FastTree:NumberOfTrees"] = "20",
        ["Scoring:FastTree:NumberOfLeaves"] = "6",
    });

    private (int Exit, string Out, string Err) Run(params string[] args)
    {
        var root = new RootCommand { ImportCommand.Create(Configure) };
        foreach (var c in BackupCommand.Create(Configure)) root.Subcommands.Add(c);
        var (stdout, stderr) = (new StringWriter(), new StringWriter());
        var (oldOut, oldErr) = (Console.Out, Console.Error);
        Console.SetOut(stdout);
        Console.SetError(stderr);
        try { return (root.Parse(args).Invoke(), stdout.ToString(), stderr.ToString()); }
        finally
        {
            Console.SetOut(oldOut);
            Console.SetError(oldErr);
        }
    }

    private long Claims()
    {
        using var c = new SqliteConnection($"Data Source={Path.Combine(_dir, "data", "triage.db")};Pooling=False");
        c.Open();
        using var cmd = c.CreateCommand();
        cmd.CommandText = "SELECT COUNT(*) FROM Claims";
        return (long)cmd.ExecuteScalar()!;
    }

    [Fact]
    public void Backs_up_then_restores_only_when_told_to_overwrite()
    {
        var first = Path.Combine(_dir, "first.csv");
        File.WriteAllText(first, IntakeRows.Csv(IntakeRows.Many(5, "BK1")));
        Assert.Equal(0, Run("import", first).Exit);
        var atBackup = Claims();
        var archive = Path.Combine(_dir, "store.zip");

        var backup = Run("backup", archive);
        Assert.True(backup.Exit == 0, backup.Err);
        Assert.Contains($"Backed up {atBackup} claims", backup.Out);

        var second = Path.Combine(_dir, "second.csv");
        File.WriteAllText(second, IntakeRows.Csv(IntakeRows.Many(7, "BK2")));
        Assert.Equal(0, Run("import", second).Exit);
        Assert.Equal(atBackup + 7, Claims());

        var unconfirmed = Run("restore", archive);
        Assert.Equal(2, unconfirmed.Exit);
        Assert.Contains("--overwrite", unconfirmed.Err);
        Assert.Equal(atBackup + 7, Claims());

        var restore = Run("restore", archive, "--overwrite");
        Assert.True(restore.Exit == 0, restore.Err);
        Assert.Equal(atBackup, Claims());

        var missing = Run("restore", Path.Combine(_dir, "nowhere.zip"), "--overwrite");
        Assert.Equal(1, missing.Exit);
        Assert.Contains("no backup at", missing.Err);
    }
}
