using Triage.Testing.LightGbm;
using Triage.Scoring.Explaining;
using Triage.Scoring.Tests.Trees;
using Triage.Scoring.Trees;

namespace Triage.Scoring.Tests.Explaining;

/// <summary>
/// Our loader and explainer against LightGBM 4.6.0's own predict and its native TreeSHAP
/// (C_API_PREDICT_CONTRIB, path-dependent, Lundberg et al. 2020), on boosters it trained itself.
/// </summary>
public class LightGbmContributionTests
{
    private const int Columns = 12;
    private const string DatasetParameters = "max_bin=255 min_data_in_bin=1 verbose=-1";
    private const string Booster = "objective=binary num_leaves=31 learning_rate=0.1 verbose=-1 num_threads=1 seed=7 deterministic=true";

    [Theory]
    // Our output is the model's log-odds; `scale` turns LightGBM's raw score and contributions into it.
    [InlineData("", "", 1.0)]                      // missing type NaN on features 0–3, None elsewhere
    [InlineData(" zero_as_missing=true", "", 1.0)] // missing type Zero
    [InlineData("", " sigmoid=2", 2.0)]            // probability = 1 / (1 + exp(−2 · raw))
    // Random-forest mode: LightGBM 4.6.0's raw score and contributions are sums over the 50 trees,
    // while its probability is the sigmoid of their mean (observed here, not documented).
    [InlineData("", " boosting=rf bagging_freq=1 bagging_fraction=0.7 feature_fraction=0.8", 1.0 / 50)]
    public void Matches_native_predictions_and_contributions(string datasetExtra, string boosterExtra, double scale)
    {
        var (trainX, labels) = ClaimLikeData.Generate(3000, Columns, seed: 1);
        // NaN in every column at predict time also exercises splits trained without missing values.
        var (testX, _) = ClaimLikeData.Generate(2000, Columns, seed: 2, extraNaN: 0.05);
        using var native = LightGbmBooster.Train(trainX, labels, Columns, DatasetParameters + datasetExtra, Booster + boosterExtra, iterations: 50);

        var model = LightGbmModelText.Parse(native.ModelText());
        var explainer = new TreeShapExplainer(model.Ensemble);
        var raw = native.Predict(testX, Columns, LightGbmBooster.PredictRaw);
        var probability = native.Predict(testX, Columns, LightGbmBooster.PredictNormal);
        var contributions = native.Predict(testX, Columns, LightGbmBooster.PredictContrib);

        Assert.Equal(50, model.Ensemble.Trees.Count);
        Assert.StartsWith("binary", model.Objective);
        Assert.Equal(Columns, model.FeatureNames.Count);
        var phi = new double[Columns];
        for (var r = 0; r < raw.Length; r++)
        {
            var x = testX.AsSpan(r * Columns, Columns);
            var output = explainer.Explain(x, phi);
            Assert.Equal(scale * raw[r], model.Ensemble.Predict(x), 1e-9);  // LightGBM raw score
            Assert.Equal(scale * raw[r], output, 1e-9);
            Assert.Equal(probability[r], 1 / (1 + Math.Exp(-output)), 1e-12); // LightGBM normal = sigmoid of our log-odds
            var native1 = contributions.AsSpan(r * (Columns + 1), Columns + 1);
            for (var c = 0; c < Columns; c++) Assert.Equal(scale * native1[c], phi[c], 1e-9);  // LightGBM TreeSHAP
            Assert.Equal(scale * native1[Columns], explainer.ExpectedValue, 1e-9);           // its expected-value column
        }
    }

    [Fact]
    public void Generated_models_use_every_missing_type()
    {
        // Guards the comparison above: LightGBM must really have written NaN- and Zero-missing splits.
        var (trainX, labels) = ClaimLikeData.Generate(3000, Columns, seed: 1);
        using var nanModel = LightGbmBooster.Train(trainX, labels, Columns, DatasetParameters, Booster, iterations: 50);
        using var zeroModel = LightGbmBooster.Train(trainX, labels, Columns, DatasetParameters + " zero_as_missing=true", Booster, iterations: 50);
        var kinds = new[] { nanModel, zeroModel }
            .SelectMany(m => LightGbmModelText.Parse(m.ModelText()).Ensemble.Trees)
            .SelectMany(t => t.Missing).Distinct().ToHashSet();
        Assert.Contains(MissingRouting.DefaultWay, kinds);
        Assert.Contains(MissingRouting.ZeroDefaultWay, kinds);
        Assert.Contains(MissingRouting.AsZero, kinds);
    }
}
