using System.CommandLine;
using System.Globalization;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cli.Import;

namespace Triage.Cli.Export;

/// <summary><c>triage export --format csv|parquet --out FILE</c>: the same audited outcomes export as the export page.</summary>
public static class ExportCommand
{
    public static Command Create(Action<IConfigurationBuilder>? configure = null)
    {
        var format = new Option<string>("--format") { Description = "csv or parquet.", Required = true };
        format.AcceptOnlyFromAmong("csv", "parquet");
        var output = new Option<FileInfo>("--out") { Description = "File to write; replaced whole only when the export succeeds.", Required = true };
        var from = new Option<string?>("--from") { Description = "First verdict day, yyyy-MM-dd (UTC)." };
        var to = new Option<string?>("--to") { Description = "Last verdict day, yyyy-MM-dd (UTC), included." };
        var line = new Option<string?>("--line") { Description = "Only this line of business." };
        var model = new Option<string?>("--model") { Description = "Only cases scored by this model version." };
        var pseudonymise = new Option<bool>("--pseudonymise") { Description = "Replace claim numbers and identifier fields with stable keyed pseudonyms." };
        var inconclusive = new Option<bool>("--include-inconclusive") { Description = "Also export inconclusive verdicts (label left empty)." };
        var command = new Command("export", "Export closed cases with their verdict label and the feature values they were scored on.")
            { format, output, from, to, line, model, pseudonymise, inconclusive };
        command.SetAction(async (parse, ct) =>
        {
            if (!TryDate(parse.GetValue(from), "--from", out var fromDay) || !TryDate(parse.GetValue(to), "--to", out var toDay)) return 2;
            var kind = parse.GetValue(format) == "parquet" ? ExportFormat.Parquet : ExportFormat.Csv;
            var filter = new ExportFilter(fromDay, toDay, Blank(parse.GetValue(line)), Blank(parse.GetValue(model)),
                parse.GetValue(inconclusive), parse.GetValue(pseudonymise));
            var path = parse.GetValue(output)!.FullName;
            var temp = $"{path}.{Guid.NewGuid():N}.tmp";
            try
            {
                using var host = await StoreHost.StartAsync(configure, ct);
                await using var scope = host.Services.CreateAsyncScope();
                var export = await scope.ServiceProvider.GetRequiredService<OutcomeExportService>().PrepareAsync(StoreHost.Operator, filter, ct);
                ExportResult result;
                await using (var file = new FileStream(temp, FileMode.CreateNew, FileAccess.ReadWrite))
                    result = await export.WriteAsync(kind, file, ct);
                File.Move(temp, path, overwrite: true);
                Console.WriteLine($"Exported {result.Rows} row(s) ({filter.Describe()}) to {path}.");
                return 0;
            }
            catch (Exception e) when (e is IOException or InvalidDataException or AccessDeniedException or UnauthorizedAccessException)
            {
                Console.Error.WriteLine($"error: {e.Message}");
                return 1;
            }
            finally
            {
                if (File.Exists(temp)) File.Delete(temp);
            }
        });
        return command;
    }

    private static string? Blank(string? s) => string.IsNullOrWhiteSpace(s) ? null : s.Trim();

    private static bool TryDate(string? raw, string option, out DateOnly? day)
    {
        day = null;
        if (Blank(raw) is not { } v) return true;
        if (DateOnly.TryParseExact(v, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var d))
        {
            day = d;
            return true;
        }
        Console.Error.WriteLine($"error: {option} must be a date as yyyy-MM-dd (got '{v}').");
        return false;
    }
}
