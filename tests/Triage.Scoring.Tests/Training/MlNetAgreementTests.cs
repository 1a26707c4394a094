using Triage.Scoring.Models;
using Triage.Scoring.Tests.Support;

namespace Triage.Scoring.Tests.Training;

[Collection(TrainedModelsCollection.Name)]
public class MlNetAgreementTests(TrainedModels models)
{
    [Theory]
    [InlineData(TrainerKind.FastTree)]
    [InlineData(TrainerKind.FastForest)]
    [InlineData(TrainerKind.Lbfgs)]
    public void Our_probability_equals_ml_net_probability_on_every_row(TrainerKind kind)
    {
        // Reference: the Probability column of Microsoft.ML 5.0.1's own scorer, run from the saved model.zip.
        // Tolerance 1e-6: ML.NET computes in float.
        var model = models[kind];
        var claims = models.Rows.Select(r => r.Values).ToList();
        var reference = MlNetScores.Score(model, claims);
        var worst = 0.0;
        for (var i = 0; i < claims.Count; i++)
            worst = Math.Max(worst, Math.Abs(reference[i].Probability - model.Probability(claims[i])));
        Assert.True(worst < 1e-6, $"largest probability difference {worst:E2}");
    }

    [Theory]
    [InlineData(TrainerKind.FastTree)]
    [InlineData(TrainerKind.FastForest)]
    public void Raw_nan_values_follow_ml_net_trees(TrainerKind kind)
    {
        // Reference: ML.NET 5.0.1 Probability on vectors that hold NaN itself (not our missing code).
        // Our trees route NaN with MissingRouting.Compare (NaN <= t is false → right), as ML.NET does.
        var model = models[kind];
        var x = models.Rows.Take(300).Select(r => model.Layout.Base.Encode(r.Values)).ToList();
        Assert.All(x.Take(20), row => Assert.Contains(row, double.IsNaN));
        var ml = new Microsoft.ML.MLContext(1);
        var scored = model.LoadMlNet(ml).Transform(Triage.Scoring.Training.MlData.ToDataView(ml, x, null, null, model.Layout.Count));
        var reference = ml.Data.CreateEnumerable<MlNetScores.Scored>(scored, reuseRowObject: false).ToList();
        for (var i = 0; i < x.Count; i++)
            Assert.Equal(reference[i].Probability, ScoringModel.Sigmoid(model.Part.Trees!.Predict(x[i])), 1e-6);
    }

    [Fact]
    public void Fast_forest_log_odds_are_the_platt_map_of_the_tree_sum()
    {
        // Reference: ML.NET 5.0.1 FastForest with the fitted Platt calibrator: logit(Probability) must
        // equal our ensemble, −Slope·Σ_t tree_t(x) − Offset (ML.NET's forest Score sums its trees).
        var model = models[TrainerKind.FastForest];
        var claims = models.Rows.Take(500).Select(r => r.Values).ToList();
        var reference = MlNetScores.Score(model, claims);
        for (var i = 0; i < claims.Count; i++)
        {
            var p = (double)reference[i].Probability;
            var referenceLogOdds = Math.Log(p / (1 - p));
            Assert.Equal(referenceLogOdds, model.LogOdds(model.Layout.Encode(claims[i])), 1e-4);
        }
    }

    [Fact]
    public void Fast_tree_makes_numeric_splits_only_on_one_hot_columns()
    {
        // Read from the ML.NET 5.0.1 model itself: no tree uses a categorical split, so every split is
        // a plain threshold our flat trees reproduce.
        var rows = models.Rows.Take(1500).ToList();
        var layout = models[TrainerKind.FastTree].Layout;
        var x = rows.Select(r => layout.Encode(r.Values)).ToList();
        var fitted = Triage.Scoring.Training.MlNetTraining.Fit(new Microsoft.ML.MLContext(7), TrainerKind.FastTree, TrainedModels.Options,
            x, [.. rows.Select(r => r.IsFraud)], [.. rows.Select(r => r.Weight)], layout.Count);
        var predictor = (Microsoft.ML.Data.BinaryPredictionTransformer<Microsoft.ML.Calibrators.CalibratedModelParametersBase<
            Microsoft.ML.Trainers.FastTree.FastTreeBinaryModelParameters, Microsoft.ML.Calibrators.PlattCalibrator>>)fitted.MlNet;
        var trees = predictor.Model.SubModel.TrainedTreeEnsemble.Trees;
        Assert.NotEmpty(trees);
        Assert.All(trees, t => Assert.DoesNotContain(true, t.CategoricalSplitFlags));
        Assert.Contains(trees, t => t.NumericalSplitFeatureIndexes.Any(f => layout.Columns[f].Kind == Triage.Scoring.Features.ColumnKind.Level));
    }
}
