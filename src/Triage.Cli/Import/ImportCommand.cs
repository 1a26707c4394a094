using System.CommandLine;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Spectre.Console;
using Triage.Cases.Domain;
using Triage.Cases.Intake;

namespace Triage.Cli.Import;

/// <summary><c>triage import &lt;file&gt;</c>: the same all-or-nothing intake as the upload page and the API, with a progress bar.</summary>
public static class ImportCommand
{
    public static Command Create(Action<IConfigurationBuilder>? configure = null)
    {
        var file = new Argument<FileInfo>("file") { Description = "Claims as CSV (header row, UTF-8) or, when the name ends in .json, a JSON array." };
        var delimiter = new Option<string>("--delimiter") { Description = "CSV field delimiter: one character, or 'tab'.", DefaultValueFactory = _ => "," };
        var command = new Command("import", "Check every claim in a file, then score and store them all (or nothing).") { file, delimiter };
        command.SetAction(async (parse, ct) =>
        {
            var path = parse.GetValue(file)!.FullName;
            var separator = parse.GetValue(delimiter) is "tab" ? "\t" : parse.GetValue(delimiter)!;
            if (separator.Length != 1)
            {
                Console.Error.WriteLine("error: --delimiter must be one character, or 'tab'.");
                return 2;
            }
            if (!File.Exists(path))
            {
                Console.Error.WriteLine($"error: file '{path}' does not exist.");
                return 1;
            }
            try
            {
                using var host = await StoreHost.StartAsync(configure, ct);
                await using var scope = host.Services.CreateAsyncScope();
                var intake = scope.ServiceProvider.GetRequiredService<ClaimIntake>();
                var report = await RunWithProgressAsync(intake, ImportSource.FromFile(path, separator[0]), ct);
                if (!report.Rejected)
                {
                    Console.WriteLine(report.Summary);
                    return 0;
                }
                Console.Error.WriteLine(report.Summary);
                foreach (var e in report.Errors) Console.Error.WriteLine($"  {e}");
                return 1;
            }
            catch (Exception e) when (e is IntakeUnavailableException or IOException or AccessDeniedException)
            {
                Console.Error.WriteLine($"error: {e.Message}");
                return 1;
            }
        });
        return command;
    }

    private static async Task<ImportReport> RunWithProgressAsync(ClaimIntake intake, ImportSource source, CancellationToken ct)
    {
        var terminal = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(Console.Error) });
        // Redirected to a file or a pipe (a nightly job, a CI log), a bar cannot redraw: write a line per tenth instead.
        if (!terminal.Profile.Capabilities.Interactive)
            return await intake.ImportAsync(source, StoreHost.Operator, new LineProgress(source.Name, Console.Error), ct);
        ImportReport? report = null;
        await terminal.Progress().AutoClear(false)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new ElapsedTimeColumn())
            .StartAsync(async ctx =>
            {
                var name = Markup.Escape(source.Name);
                var progress = new BarProgress(ctx.AddTask($"Checking {name}", maxValue: 1), ctx.AddTask($"Storing {name}", maxValue: 1, autoStart: false));
                report = await intake.ImportAsync(source, StoreHost.Operator, progress, ct);
            });
        return report!;
    }

    /// <summary>Moves the bars as intake reports, on the reporting thread (no synchronisation context here).</summary>
    private sealed class BarProgress(ProgressTask checking, ProgressTask storing) : IProgress<ImportProgress>
    {
        public void Report(ImportProgress p)
        {
            var bar = p.Stage == "Checking" ? checking : storing;
            if (!bar.IsStarted) bar.StartTask();
            bar.Value = p.Fraction;
        }
    }

    /// <summary>"Checking claims.csv: 40% (4,000 rows)", once per stage and tenth.</summary>
    private sealed class LineProgress(string name, TextWriter to) : IProgress<ImportProgress>
    {
        private (string Stage, int Tenth) _last = ("", -1);

        public void Report(ImportProgress p)
        {
            var tenth = (int)Math.Floor(p.Fraction * 10);
            if ((p.Stage, tenth) == _last) return;
            _last = (p.Stage, tenth);
            to.WriteLine($"{p.Stage} {name}: {tenth * 10}% ({p.Rows:N0} rows)");
        }
    }
}
