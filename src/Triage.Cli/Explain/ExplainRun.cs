using System.Globalization;
using CsvHelper;
using Spectre.Console;

namespace Triage.Cli.Explain;

/// <summary>
/// Streams the input CSV in batches, explains each batch in parallel, and writes rows in input order
/// to a temporary file that replaces the output only when every row is done. Memory stays bounded
/// by the batch size, whatever the file length.
/// </summary>
internal sealed class ExplainRun(RowExplainer explainer, int batchSize)
{
    public int Run(string inputPath, string outputPath, IAnsiConsole progressConsole)
    {
        if (!File.Exists(inputPath)) throw new FileNotFoundException($"Input file '{inputPath}' does not exist.", inputPath);
        var full = Path.GetFullPath(outputPath);
        var temp = Path.Combine(Path.GetDirectoryName(full)!, $".{Path.GetFileName(full)}.{Guid.NewGuid():N}.tmp");
        var rows = 0;
        try
        {
            using (var input = File.OpenRead(inputPath))
            using (var reader = CsvReader.Create(new StreamReader(input), CsvReaderOptions.Default, leaveOpen: false))
            using (var output = new StreamWriter(temp))
            using (var writer = CsvWriter.Create(output, CsvWriterOptions.Default with { NewLine = "\n", FormatProvider = CultureInfo.InvariantCulture }, leaveOpen: true))
            {
                var header = reader.Headers.ToArray();
                if (header.Length == 0) throw new InvalidDataException($"Input '{inputPath}' has no header row.");
                try { explainer.Bind(header); }
                catch (InvalidDataException e) { throw new InvalidDataException($"Input '{inputPath}': {e.Message}", e); }
                writer.WriteHeader([.. new[] { "base_value", "log_odds", "probability" }.Concat(explainer.Contributions)]);

                progressConsole.Progress().AutoClear(false).Columns(
                    new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new ElapsedTimeColumn())
                    .Start(ctx =>
                    {
                        var task = ctx.AddTask($"Explaining {Markup.Escape(Path.GetFileName(inputPath))}", maxValue: Math.Max(1, input.Length));
                        var batch = new List<string[]>(batchSize);
                        while (true)
                        {
                            batch.Clear();
                            while (batch.Count < batchSize && Next(reader, inputPath, rows + batch.Count + 1))
                                batch.Add([.. Enumerable.Range(0, header.Length).Select(i => reader.GetString(i))]);
                            if (batch.Count == 0) break;
                            foreach (var line in ExplainBatch(batch, rows, inputPath)) writer.WriteRecord(line);
                            rows += batch.Count;
                            task.Value = input.Position;
                        }
                        task.Value = task.MaxValue;
                    });
            }
            File.Move(temp, full, overwrite: true);
        }
        finally
        {
            if (File.Exists(temp)) File.Delete(temp);
        }
        return rows;
    }

    private string[][] ExplainBatch(List<string[]> batch, int firstRow, string inputPath)
    {
        var width = explainer.Contributions.Count;
        var lines = new string[batch.Count][];
        var errors = new InvalidDataException?[batch.Count];
        Parallel.For(0, batch.Count, () => new double[width], (i, _, phi) =>
        {
            try
            {
                var (b, logOdds, p) = explainer.Explain(batch[i], phi);
                var line = new string[3 + width];
                line[0] = Number(b);
                line[1] = Number(logOdds);
                line[2] = double.IsNaN(p) ? "" : Number(p);
                for (var j = 0; j < width; j++) line[3 + j] = Number(phi[j]);
                lines[i] = line;
            }
            catch (InvalidDataException e)
            {
                errors[i] = new InvalidDataException($"Input '{inputPath}' row {firstRow + i + 1} (line {firstRow + i + 2}): {e.Message}", e);
            }
            return phi;
        }, _ => { });
        // Report the first bad row, whichever thread met it first.
        var error = errors.FirstOrDefault(e => e is not null);
        return error is null ? lines : throw error;
    }

    private static bool Next(CsvReader reader, string inputPath, int row)
    {
        try { return reader.Read(); }
        catch (CsvFormatException e) { throw new InvalidDataException($"Input '{inputPath}' row {row} (line {row + 1}): {e.Message}", e); }
    }

    private static string Number(double v) => v.ToString("R", CultureInfo.InvariantCulture);
}
