using System.IO.Compression;
using Triage.Scoring.Models;
using Triage.Scoring.Tests.Support;

namespace Triage.Scoring.Tests.Models;

[Collection(TrainedModelsCollection.Name)]
public sealed class ModelFileTests(TrainedModels models) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("triage-model-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    [Theory]
    [InlineData(TrainerKind.FastTree)]
    [InlineData(TrainerKind.FastForest)]
    [InlineData(TrainerKind.Lbfgs)]
    public void Round_trip_gives_the_same_explanations(TrainerKind kind)
    {
        var model = models[kind];
        var path = Path.Combine(_dir, $"{kind}.triage-model");
        model.Save(path);
        var loaded = ScoringModel.Load(path);

        Assert.Equal(model.Metadata, loaded.Metadata);
        Assert.Equal(model.Schema.ToJson(), loaded.Schema.ToJson());
        foreach (var claim in models.Rows.Take(200).Select(r => r.Values))
            Assert.Equal(model.Explain(claim), loaded.Explain(claim), ExplanationComparer.Instance);
        // The ML.NET model inside still scores like ours.
        var reference = MlNetScores.Score(loaded, models.Rows.Take(50).Select(r => r.Values));
        Assert.All(models.Rows.Take(50).Select((r, i) => (r, i)), p => Assert.Equal(reference[p.i].Probability, loaded.Probability(p.r.Values), 1e-6));
    }

    [Fact]
    public void A_file_that_is_not_a_zip_is_refused_clearly()
    {
        var path = Path.Combine(_dir, "junk.triage-model");
        File.WriteAllText(path, "this is not a model");
        var e = Assert.Throws<InvalidDataException>(() => ScoringModel.Load(path));
        Assert.Contains($"Model file '{path}'", e.Message);
        Assert.Contains("not a zip archive", e.Message);
    }

    [Fact]
    public void A_truncated_file_is_refused_clearly()
    {
        var good = Path.Combine(_dir, "good.triage-model");
        models[TrainerKind.FastTree].Save(good);
        var bytes = File.ReadAllBytes(good);
        var path = Path.Combine(_dir, "cut.triage-model");
        File.WriteAllBytes(path, bytes[..(bytes.Length / 2)]);
        var e = Assert.Throws<InvalidDataException>(() => ScoringModel.Load(path));
        Assert.Contains($"Model file '{path}' cannot be loaded", e.Message);
    }

    [Fact]
    public void Wrong_marker_missing_part_and_feature_mismatch_are_named()
    {
        var good = Path.Combine(_dir, "good.triage-model");
        models[TrainerKind.FastTree].Save(good);

        var marker = Edit(good, "marker", zip => Replace(zip, "format.json", """{"format":"something-else","version":1}"""));
        Assert.Contains("format marker is 'something-else', expected 'triage-scoring-model'", Assert.Throws<InvalidDataException>(() => ScoringModel.Load(marker)).Message);

        var version = Edit(good, "version", zip => Replace(zip, "format.json", """{"format":"triage-scoring-model","version":9}"""));
        Assert.Contains("format version 9 is not supported", Assert.Throws<InvalidDataException>(() => ScoringModel.Load(version)).Message);

        var noStats = Edit(good, "nostats", zip => zip.GetEntry("stats.json")!.Delete());
        Assert.Contains("part 'stats.json' is missing", Assert.Throws<InvalidDataException>(() => ScoringModel.Load(noStats)).Message);

        var noMarker = Edit(good, "nomarker", zip => zip.GetEntry("format.json")!.Delete());
        Assert.Contains("part 'format.json' is missing; it is not a Triage model file", Assert.Throws<InvalidDataException>(() => ScoringModel.Load(noMarker)).Message);

        // A schema with one more category level no longer fits the trees' columns.
        var schema = models[TrainerKind.FastTree].Schema;
        var wider = schema with { Fields = [.. schema.Fields.Select(f => f.Name == "line" ? f with { Categories = [.. f.Categories!, "pet"] } : f)] };
        var mismatch = Edit(good, "mismatch", zip => Replace(zip, "schema.json", wider.ToJson()));
        var e = Assert.Throws<InvalidDataException>(() => ScoringModel.Load(mismatch));
        Assert.Contains("Feature columns do not match the schema", e.Message);
        Assert.Contains("'line=pet'", e.Message);
    }

    [Fact]
    public void A_failed_save_leaves_neither_a_partial_file_nor_a_temporary_one()
    {
        // The target is an existing folder, so the final rename fails after the temporary file was written.
        var target = Path.Combine(_dir, "taken");
        Directory.CreateDirectory(target);
        Assert.ThrowsAny<IOException>(() => models[TrainerKind.FastTree].Save(target));
        Assert.Equal([target], Directory.GetFileSystemEntries(_dir));
        Assert.Empty(Directory.GetFileSystemEntries(target));
    }

    [Fact]
    public void Saving_over_an_existing_model_replaces_it_whole()
    {
        var path = Path.Combine(_dir, "current.triage-model");
        models[TrainerKind.Lbfgs].Save(path);
        models[TrainerKind.FastTree].Save(path);
        Assert.Equal(TrainerKind.FastTree, ScoringModel.Load(path).Metadata.Trainer);
        Assert.Equal([path], Directory.GetFiles(_dir));
    }

    private string Edit(string source, string name, Action<ZipArchive> change)
    {
        var path = Path.Combine(_dir, $"{name}.triage-model");
        File.Copy(source, path);
        using (var zip = ZipFile.Open(path, ZipArchiveMode.Update)) change(zip);
        return path;
    }

    private static void Replace(ZipArchive zip, string part, string text)
    {
        zip.GetEntry(part)!.Delete();
        using var writer = new StreamWriter(zip.CreateEntry(part).Open());
        writer.Write(text);
    }
}

internal sealed class ExplanationComparer : IEqualityComparer<Triage.Scoring.Explaining.Explanation>
{
    public static readonly ExplanationComparer Instance = new();

    public bool Equals(Triage.Scoring.Explaining.Explanation? a, Triage.Scoring.Explaining.Explanation? b) =>
        a is not null && b is not null && a.BaseValue == b.BaseValue && a.LogOdds == b.LogOdds && a.Probability == b.Probability
        && a.Drivers.SequenceEqual(b.Drivers);

    public int GetHashCode(Triage.Scoring.Explaining.Explanation e) => e.LogOdds.GetHashCode();
}
