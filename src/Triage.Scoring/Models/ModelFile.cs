using System.IO.Compression;
using System.Text.Json;
using Triage.Scoring.Drift;
using Triage.Scoring.Drivers;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Models;

/// <summary>
/// One zip per model version: format.json (marker and version), metadata.json, schema.json,
/// explainer.json, stats.json, drift.json (the drift baseline; files written before it existed load
/// without one) and the ML.NET model as model.zip. Written to a temporary file in the
/// same folder and renamed, so a reader never sees half a model.
/// </summary>
internal static class ModelFile
{
    public const string Format = "triage-scoring-model";
    public const int FormatVersion = 1;
    private const string MarkerPart = "format.json", MetadataPart = "metadata.json", SchemaPart = "schema.json",
        ExplainerPartName = "explainer.json", StatsPart = "stats.json", DriftPart = "drift.json", MlNetPart = "model.zip";

    private sealed record Marker(string Format, int Version);

    public static readonly JsonSerializerOptions Json = new(ClaimSchema.Json)
    {
        NumberHandling = System.Text.Json.Serialization.JsonNumberHandling.AllowNamedFloatingPointLiterals,
    };

    public static void Write(ScoringModel model, string path)
    {
        var full = Path.GetFullPath(path);
        var temp = Path.Combine(Path.GetDirectoryName(full)!, $".{Path.GetFileName(full)}.{Guid.NewGuid():N}.tmp");
        try
        {
            using (var file = new FileStream(temp, FileMode.CreateNew, FileAccess.Write))
            using (var zip = new ZipArchive(file, ZipArchiveMode.Create))
            {
                Put(zip, MarkerPart, JsonSerializer.SerializeToUtf8Bytes(new Marker(Format, FormatVersion), Json));
                Put(zip, MetadataPart, JsonSerializer.SerializeToUtf8Bytes(model.Metadata, Json));
                Put(zip, SchemaPart, JsonSerializer.SerializeToUtf8Bytes(model.Schema, Json));
                Put(zip, ExplainerPartName, JsonSerializer.SerializeToUtf8Bytes(model.Part, Json));
                Put(zip, StatsPart, JsonSerializer.SerializeToUtf8Bytes(model.Stats, Json));
                if (model.Drift is not null) Put(zip, DriftPart, JsonSerializer.SerializeToUtf8Bytes(model.Drift, Json));
                Put(zip, MlNetPart, model.MlNetModel);
            }
            File.Move(temp, full, overwrite: true);
        }
        finally
        {
            if (File.Exists(temp)) File.Delete(temp);
        }
    }

    public static ScoringModel Read(string path)
    {
        try
        {
            using var file = File.OpenRead(path);
            using var zip = OpenZip(file);
            var marker = Part<Marker>(zip, MarkerPart, "it is not a Triage model file");
            if (marker.Format != Format)
                throw new InvalidDataException($"format marker is '{marker.Format}', expected '{Format}'.");
            if (marker.Version != FormatVersion)
                throw new InvalidDataException($"format version {marker.Version} is not supported (this build reads version {FormatVersion}).");
            var schema = Part<ClaimSchema>(zip, SchemaPart);
            schema.Validate();
            return new ScoringModel(
                Part<ModelMetadata>(zip, MetadataPart),
                schema,
                Part<ExplainerPart>(zip, ExplainerPartName),
                Part<List<FieldStats>>(zip, StatsPart),
                Bytes(zip, MlNetPart),
                zip.GetEntry(DriftPart) is null ? null : Part<DriftBaseline>(zip, DriftPart));
        }
        catch (Exception e) when (e is InvalidDataException or JsonException or ArgumentException)
        {
            throw new InvalidDataException($"Model file '{path}' cannot be loaded: {e.Message}", e);
        }
    }

    private static ZipArchive OpenZip(Stream file)
    {
        try { return new ZipArchive(file, ZipArchiveMode.Read); }
        catch (InvalidDataException e) { throw new InvalidDataException($"it is not a zip archive (corrupt or not a model file): {e.Message}", e); }
    }

    private static void Put(ZipArchive zip, string name, byte[] bytes)
    {
        using var s = zip.CreateEntry(name, CompressionLevel.Optimal).Open();
        s.Write(bytes);
    }

    private static byte[] Bytes(ZipArchive zip, string name, string? why = null)
    {
        var entry = zip.GetEntry(name) ?? throw new InvalidDataException($"part '{name}' is missing{(why is null ? "" : $"; {why}")}.");
        using var s = entry.Open();
        using var copy = new MemoryStream();
        s.CopyTo(copy);
        return copy.ToArray();
    }

    private static T Part<T>(ZipArchive zip, string name, string? why = null)
    {
        try
        {
            return JsonSerializer.Deserialize<T>(Bytes(zip, name, why), Json) ?? throw new InvalidDataException($"part '{name}' is empty.");
        }
        catch (JsonException e)
        {
            throw new InvalidDataException($"part '{name}' is not valid: {e.Message}", e);
        }
    }
}
