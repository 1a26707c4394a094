using System.CommandLine;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Support;
using Triage.Cli.Tests.Support;
using Triage.Cli.Models;

namespace Triage.Cli.Tests.Models;

/// <summary>retrain → models list → promote → rollback over a temp store seeded with the tiny scenario.</summary>
public sealed class ModelsCommandTests() : TinyStoreCommandTest(400, 20)
{
    protected override IReadOnlyDictionary<string, string?> ExtraSettings { get; } = DemoOn();

    protected override IEnumerable<Command> Commands(Action<IConfigurationBuilder> configure) =>
        [ModelsCommand.Retrain(configure), ModelsCommand.Models(configure)];

    [Fact]
    public void Retrain_promote_and_roll_back_from_the_command_line()
    {
        var retrain = Run("retrain", "--trees", "15");
        Assert.True(retrain.Exit == 0, retrain.Err);
        Assert.Contains("Challenger v2 is ready", retrain.Out);
        Assert.Contains("precision at 10", retrain.Out);
        Assert.Contains("Training", retrain.Err);

        var list = Run("models", "list");
        Assert.Contains("v1\tChampion", list.Out);
        Assert.Contains("v2\tChallenger", list.Out);

        var refused = Run("models", "rollback", "v2", "--note", "x");
        Assert.Equal(1, refused.Exit);
        Assert.Contains("never served", refused.Err);

        var promote = Run("models", "promote", "v2", "--note", "more recall", "--rescore");
        Assert.True(promote.Exit == 0, promote.Err);
        Assert.Contains("v2 serves now, replacing v1;", promote.Out);

        var back = Run("models", "rollback", "v1", "--note", "undo");
        Assert.True(back.Exit == 0, back.Err);
        Assert.Contains("v1\tChampion", Run("models", "list").Out);
    }

    [Fact]
    public void A_retrain_from_the_command_line_waits_its_turn_behind_one_running_elsewhere_on_the_same_file()
    {
        Assert.True(Run("models", "list").Exit == 0);
        // The app (another process on the same SQLite file) is retraining: it holds the retrain lock next to the database.
        using (new FileStream(DatabaseFile + ".retrain.lock", FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None))
        {
            var refused = Run("retrain", "--trees", "15");
            Assert.Equal(1, refused.Exit);
            Assert.Contains("A retrain is already running on another instance or from the command line", refused.Err);
            Assert.DoesNotContain("v2", Run("models", "list").Out);
        }
        // Once that run ends (or its process dies), the lock is free.
        var retrain = Run("retrain", "--trees", "15");
        Assert.True(retrain.Exit == 0, retrain.Err);
        Assert.Contains("Challenger v2 is ready", retrain.Out);
    }
}
