using System.CommandLine;

namespace Triage.Cli.Demo;

/// <summary><c>triage demo generate</c>: writes the deterministic demo scenario of the fictional insurer.</summary>
public static class DemoCommand
{
    public static Command Create()
    {
        var seed = new Option<int>("--seed") { Description = "Seed of the random draws; the same seed writes the same bytes.", DefaultValueFactory = _ => DemoScenario.DefaultSeed };
        var output = new Option<DirectoryInfo>("--out") { Description = "Folder to write the scenario files into.", DefaultValueFactory = _ => new DirectoryInfo("seed-cases") };
        var historyRows = new Option<int>("--history-rows") { Description = "Closed claims to write to history.csv.", DefaultValueFactory = _ => DemoScenario.DefaultHistoryRows };
        var openRows = new Option<int>("--open-rows") { Description = "Open claims of the last ten days to write to open-claims.csv.", DefaultValueFactory = _ => DemoScenario.DefaultOpenRows };

        var generate = new Command("generate", "Write schema, history, open claims, team and playbook of the demo scenario.")
        {
            seed, output, historyRows, openRows,
        };
        generate.SetAction(parse =>
        {
            var options = new DemoOptions(parse.GetValue(seed), parse.GetValue(historyRows), parse.GetValue(openRows));
            if (options.HistoryRows < 1 || options.OpenRows < 1)
            {
                Console.Error.WriteLine("--history-rows and --open-rows must both be at least 1.");
                return 2;
            }
            var data = DemoGenerator.Generate(options);
            var folder = parse.GetValue(output)!.FullName;
            foreach (var file in DemoWriter.Write(data, folder)) Console.WriteLine(file);
            var s = data.Scenario;
            Console.WriteLine($"{s.Insurer}, seed {s.Seed}, as of {s.AsOf}: {s.HistoryRows} closed claims (fraud rate {s.FraudRate:P2}), {s.OpenRows} open.");
            return 0;
        });

        return new Command("demo", "The demo scenario of Larchmere Mutual.") { generate };
    }
}
