using System.CommandLine;
using Spectre.Console;

namespace Triage.Cli.Explain;

/// <summary>
/// <c>triage explain</c>: per row of a claims CSV (Triage model) or a feature CSV (LightGBM model text),
/// the base value, log-odds, probability and one log-odds contribution per field or feature.
/// </summary>
public static class ExplainCommand
{
    public static Command Create()
    {
        var model = new Option<FileInfo>("--model") { Description = "A Triage model file, or a LightGBM model saved as text.", Required = true };
        var input = new Option<FileInfo>("--input") { Description = "Claims CSV (Triage model) or feature CSV with columns named as the model's features (LightGBM).", Required = true };
        var output = new Option<FileInfo>("--output") { Description = "CSV to write; replaced only when every row is explained.", Required = true };
        var batch = new Option<int>("--batch-size") { Description = "Rows read and explained together (bounds memory).", DefaultValueFactory = _ => 4096 };

        var command = new Command("explain", "Explain every row of a CSV: base value + contributions = log-odds.") { model, input, output, batch };
        command.SetAction(parse =>
        {
            var size = parse.GetValue(batch);
            if (size < 1)
            {
                Console.Error.WriteLine("--batch-size must be at least 1.");
                return 2;
            }
            var stderr = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(Console.Error) });
            try
            {
                var explainer = RowExplainer.Open(parse.GetValue(model)!.FullName);
                var rows = new ExplainRun(explainer, size).Run(parse.GetValue(input)!.FullName, parse.GetValue(output)!.FullName, stderr);
                stderr.MarkupLineInterpolated($"Explained {rows} rows into {parse.GetValue(output)!.FullName}.");
                return 0;
            }
            catch (Exception e) when (e is InvalidDataException or FileNotFoundException)
            {
                Console.Error.WriteLine($"error: {e.Message}");
                return 1;
            }
        });
        return command;
    }
}
