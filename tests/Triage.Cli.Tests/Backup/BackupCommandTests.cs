using System.CommandLine;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Support;
using Triage.Cli.Tests.Support;
using Triage.Cli.Backup;
using Triage.Cli.Import;

namespace Triage.Cli.Tests.Backup;

/// <summary>backup and restore run in-process over a temp store seeded with the tiny scenario.</summary>
public sealed class BackupCommandTests() : TinyStoreCommandTest(300, 20)
{
    protected override IEnumerable<Command> Commands(Action<IConfigurationBuilder> configure) =>
        [ImportCommand.Create(configure), .. BackupCommand.Create(configure)];

    private long Claims()
    {
        using var c = new SqliteConnection($"Data Source={DatabaseFile};Pooling=False");
        c.Open();
        using var cmd = c.CreateCommand();
        cmd.CommandText = "SELECT COUNT(*) FROM Claims";
        return (long)cmd.ExecuteScalar()!;
    }

    [Fact]
    public void Backs_up_then_restores_only_when_told_to_overwrite()
    {
        var first = Path.Combine(Dir, "first.csv");
        File.WriteAllText(first, IntakeRows.Csv(IntakeRows.Many(5, "BK1")));
        Assert.Equal(0, Run("import", first).Exit);
        var atBackup = Claims();
        var archive = Path.Combine(Dir, "store.zip");

        var backup = Run("backup", archive);
        Assert.True(backup.Exit == 0, backup.Err);
        Assert.Contains($"Backed up {atBackup} claims", backup.Out);

        var second = Path.Combine(Dir, "second.csv");
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

        var missing = Run("restore", Path.Combine(Dir, "nowhere.zip"), "--overwrite");
        Assert.Equal(1, missing.Exit);
        Assert.Contains("no backup at", missing.Err);
    }
}
