using System.IO.Compression;
using Triage.Scoring.Drift;
using Triage.Scoring.Models;
using Triage.Scoring.Tests.Support;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Drift;

[Collection(TrainedModelsCollection.Name)]
public sealed class DriftBaselineTests(TrainedModels models) : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("triage-drift-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    [Fact]
    public void Decile_edges_of_one_to_a_hundred_are_the_tens()
    {
        var values = Enumerable.Range(1, 100).Select(i => (double)i).ToArray();
        Assert.Equal([10.0, 20, 30, 40, 50, 60, 70, 80, 90], DriftBaseline.DecileEdges(values, Ones(100)));
    }

    [Fact]
    public void Tied_values_share_one_edge_and_missing_values_are_left_out_of_the_edges()
    {
        // 50 zeros, 30 ones, 20 twos: deciles 1–5 fall on 0, 6–8 on 1, 9 on 2.
        double[] values = [.. Enumerable.Repeat(0.0, 50), .. Enumerable.Repeat(1.0, 30), .. Enumerable.Repeat(2.0, 20), double.NaN, double.NaN];
        Assert.Equal([0.0, 1, 2], DriftBaseline.DecileEdges(values, Ones(values.Length)));
    }

    [Fact]
    public void A_weight_counts_like_repeated_rows()
    {
        // Weights 50, 30, 20 on the values 1, 2, 3 give the edges of 50 ones, 30 twos and 20 threes (see above).
        Assert.Equal([1.0, 2, 3], DriftBaseline.DecileEdges([1, 2, 3], [50, 30, 20]));
    }

    [Fact]
    public void Numbers_categories_and_yes_no_have_their_bins_and_the_training_rows_have_zero_psi_against_themselves()
    {
        var rows = models.Rows.Take(2000).ToList();
        var scores = rows.Select((_, i) => (i % 97) / 97.0).ToList();
        var baseline = DriftBaseline.Compute(SyntheticClaims.Schema, rows, scores);
        Assert.Equal(SyntheticClaims.Schema.FeatureNames, baseline.Fields.Select(f => f.Name));

        var amount = baseline.Fields.Single(f => f.Name == "claimed_amount");
        Assert.Equal(DriftBinKind.Number, amount.Kind);
        Assert.Equal(9, amount.Edges.Count);
        Assert.Equal(11, amount.Expected.Count);
        Assert.All(amount.Expected.Take(10), s => Assert.InRange(s, 0.095, 0.105));
        Assert.Equal(0.0, amount.Expected[10]);

        var line = baseline.Fields.Single(f => f.Name == "line");
        Assert.Equal(["motor", "home", "travel", DriftBins.OtherLabel], line.Labels());
        Assert.Equal(1.0, line.Expected.Sum(), 1e-12);
        var police = baseline.Fields.Single(f => f.Name == "police_report");
        Assert.Equal(["no", "yes", DriftBins.MissingLabel], police.Labels());
        Assert.Equal(rows.Count(r => r.Values["police_report"] is null) / (double)rows.Count, police.Expected[2], 1e-12);

        var tally = new DriftTally(SyntheticClaims.Schema, baseline);
        foreach (var (r, s) in rows.Zip(scores)) tally.Add(r.Values, s);
        Assert.All(tally.Fields(), f => Assert.Equal(0.0, f.Psi, 1e-12));
        Assert.Equal(0.0, tally.Score().Psi, 1e-12);
    }

    [Fact]
    public void A_shifted_population_drifts_on_the_shifted_field_only()
    {
        var rows = models.Rows.Take(2000).ToList();
        var baseline = DriftBaseline.Compute(SyntheticClaims.Schema, rows, [.. rows.Select(_ => 0.1)]);
        var tally = new DriftTally(SyntheticClaims.Schema, baseline);
        // Every recent claim is a motor claim; an unknown line would count as "other".
        foreach (var r in models.Rows.Skip(2000).Where(r => r.Values["line"] == "motor")) tally.Add(r.Values, 0.1);
        var byName = tally.Fields().ToDictionary(f => f.Name);
        Assert.Equal(DriftBand.Act, byName["line"].Band);
        Assert.Equal(1.0, byName["line"].Bins.Single(b => b.Label == "motor").Actual);
        Assert.Equal(DriftBand.Stable, byName["loss_hour"].Band);
    }

    [Fact]
    public void Training_saves_a_baseline_in_the_model_file_and_an_older_file_without_one_still_loads()
    {
        var model = models[TrainerKind.FastTree];
        Assert.NotNull(model.Drift);
        Assert.Equal(model.Metadata.TrainingRows, model.Drift!.Rows);
        // The score's deciles come from the model's own probabilities on its training rows.
        Assert.Equal(11, model.Drift.Score.Expected.Count);
        Assert.All(model.Drift.Score.Expected.Take(10), s => Assert.InRange(s, 0.05, 0.2));

        var path = Path.Combine(_dir, "with.triage-model");
        model.Save(path);
        var loaded = ScoringModel.Load(path);
        Assert.Equal(model.Drift.Fields.Select(f => (f.Name, string.Join(',', f.Edges), string.Join(',', f.Levels), string.Join(',', f.Expected))),
            loaded.Drift!.Fields.Select(f => (f.Name, string.Join(',', f.Edges), string.Join(',', f.Levels), string.Join(',', f.Expected))));

        var old = Path.Combine(_dir, "old.triage-model");
        File.Copy(path, old);
        using (var zip = ZipFile.Open(old, ZipArchiveMode.Update)) zip.GetEntry("drift.json")!.Delete();
        var before = ScoringModel.Load(old);
        Assert.Null(before.Drift);
        Assert.Equal(model.Probability(models.Rows[0].Values), before.Probability(models.Rows[0].Values));
    }

    private static double[] Ones(int n) => [.. Enumerable.Repeat(1.0, n)];
}
