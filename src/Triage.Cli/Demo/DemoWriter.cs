using System.Globalization;
using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Serialization;
using CsvHelper;

namespace Triage.Cli.Demo;

/// <summary>
/// Writes a scenario folder. Every file goes to a temporary name first and is renamed only after
/// all of them were written, so a failed run leaves the previous files untouched.
/// </summary>
internal static class DemoWriter
{
    public const string SchemaFile = "schema.json";
    public const string ScenarioFile = "scenario.json";
    public const string HistoryFile = "history.csv";
    public const string OpenFile = "open-claims.csv";
    public const string TeamFile = "team.json";
    public const string PlaybookFile = "playbook.json";

    private static readonly UTF8Encoding Utf8NoBom = new(encoderShouldEmitUTF8Identifier: false);

    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        WriteIndented = true,
        NewLine = "\n",
        DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
        Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };

    public static IReadOnlyList<string> Write(DemoDataSet data, string folder)
    {
        Directory.CreateDirectory(folder);
        var schema = DemoSchema.Build();
        schema.Validate();
        var fields = schema.Fields.Select(f => f.Name).ToList();

        var files = new (string Name, Action<TextWriter> Write)[]
        {
            (SchemaFile, w => w.Write(schema.ToJson().ReplaceLineEndings("\n") + "\n")),
            (ScenarioFile, w => WriteJson(w, data.Scenario)),
            (HistoryFile, w => WriteCsv(w, ClaimRows.HistoryHeader(fields), data.History.Select(ClaimRows.History))),
            (OpenFile, w => WriteCsv(w, ClaimRows.OpenHeader(fields), data.Open.Select(ClaimRows.Open))),
            (TeamFile, w => WriteJson(w, Team.Build())),
            (PlaybookFile, w => WriteJson(w, Playbook.Build())),
        };

        var temps = new List<(string Temp, string Final)>();
        try
        {
            foreach (var (name, write) in files)
            {
                var final = Path.Combine(folder, name);
                var temp = final + ".tmp";
                temps.Add((temp, final));
                using var writer = new StreamWriter(temp, append: false, Utf8NoBom) { NewLine = "\n" };
                write(writer);
            }
            foreach (var (temp, final) in temps) File.Move(temp, final, overwrite: true);
        }
        finally
        {
            foreach (var (temp, _) in temps) File.Delete(temp);
        }
        return [.. temps.Select(t => t.Final)];
    }

    private static void WriteJson<T>(TextWriter writer, T value) => writer.Write(JsonSerializer.Serialize(value, Json) + "\n");

    private static void WriteCsv(TextWriter writer, string[] header, IEnumerable<string[]> rows)
    {
        var options = CsvWriterOptions.Default with { NewLine = "\n", FormatProvider = CultureInfo.InvariantCulture };
        using var csv = CsvWriter.Create(writer, options, leaveOpen: true);
        csv.WriteHeader(header);
        foreach (var row in rows) csv.WriteRecord(row);
    }
}
