using System.CommandLine;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Support;
using Triage.Cli.Models;

namespace Triage.Cli.Tests.Models;

/// <summary>retrain → models list → promote → rollback over a temp store seeded with the tiny scenario.</summary>
[Collection(Triage.Cli.Tests.Support.ConsoleCollection.Name)]
public sealed class ModelsCommandTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("triage-models-").FullName;

    public ModelsCommandTests() => TinySeed.Write(Path.Combine(_dir, "seed"), historyRows: 400, openRows: 20);

    public void Dispose()
    {
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        Directory.Delete(_dir, recursive: true);
    }

    private void Configure(IConfigurationBuilder c) => c.AddInMemoryCollection(new Dictionary<string, string?>
    {
        ["Storage:Provider"] = "Sqlite",
        ["Storage:DataFolder"] = Path.Combine(_dir, "data"),
        ["Demo:Enabled"] = "true",
        ["Demo:Password"] = TinySeed.Password,
        ["Demo:SeedFolder"] = Path.Combine(_dir, "seed"),
        ["Scoring:FastTree:NumberOfTrees"] = "20",
        ["Scoring:FastTree:NumberOfLeaves"] = "6",
    });

    private (int Exit, string Out, string Err) Run(params string[] args)
    {
        var root = new RootCommand { ModelsCommand.Retrain(Configure), ModelsCommand.Models(Configure) };
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
}
