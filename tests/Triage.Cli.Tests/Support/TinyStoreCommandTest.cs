using System.CommandLine;
using Microsoft.Data.Sqlite;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Support;

namespace Triage.Cli.Tests.Support;

/// <summary>
/// Commands run in-process over a temp SQLite store seeded with the tiny scenario (a 20-tree model),
/// with the console captured. Subclasses name their commands and any extra settings.
/// </summary>
[Collection(ConsoleCollection.Name)]
public abstract class TinyStoreCommandTest : IDisposable
{
    protected string Dir { get; } = Directory.CreateTempSubdirectory("triage-cli-").FullName;

    protected TinyStoreCommandTest(int historyRows, int openRows) =>
        TinySeed.Write(Path.Combine(Dir, "seed"), historyRows, openRows);

    /// <summary>Settings on top of the tiny store's (demo off unless a subclass turns it on).</summary>
    protected virtual IReadOnlyDictionary<string, string?> ExtraSettings { get; } = new Dictionary<string, string?>();

    protected abstract IEnumerable<Command> Commands(Action<IConfigurationBuilder> configure);

    protected string DatabaseFile => Path.Combine(Dir, "data", "triage.db");

    protected void Configure(IConfigurationBuilder c)
    {
        var settings = new Dictionary<string, string?>
        {
            ["Storage:Provider"] = "Sqlite",
            ["Storage:DataFolder"] = Path.Combine(Dir, "data"),
            ["Demo:Enabled"] = "false",
            ["Demo:SeedFolder"] = Path.Combine(Dir, "seed"),
            ["Scoring:FastTree:NumberOfTrees"] = "20",
            ["Scoring:FastTree:NumberOfLeaves"] = "6",
        };
        foreach (var (key, value) in ExtraSettings) settings[key] = value;
        c.AddInMemoryCollection(settings);
    }

    /// <summary>Demo accounts and closed history cases, for commands that need them.</summary>
    protected static Dictionary<string, string?> DemoOn(params (string Key, string? Value)[] more)
    {
        var settings = new Dictionary<string, string?> { ["Demo:Enabled"] = "true", ["Demo:Password"] = TinySeed.Password };
        foreach (var (key, value) in more) settings[key] = value;
        return settings;
    }

    protected (int Exit, string Out, string Err) Run(params string[] args)
    {
        var root = new RootCommand();
        foreach (var command in Commands(Configure)) root.Subcommands.Add(command);
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

    public void Dispose()
    {
        SqliteConnection.ClearAllPools();
        Directory.Delete(Dir, recursive: true);
        GC.SuppressFinalize(this);
    }
}
