using Microsoft.ML;
using Microsoft.ML.Calibrators;
using Microsoft.ML.Data;
using Microsoft.ML.Trainers;
using Triage.Scoring.Features;
using Triage.Scoring.Tests.Support;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Training;

public class LinearContributionTests
{
    public sealed class Contributions
    {
        public float Score { get; set; }
        public float[] FeatureContributions { get; set; } = [];
    }

    [Fact]
    public void Centred_ml_net_contributions_equal_ours_and_add_up()
    {
        // Reference: Microsoft.ML 5.0.1 CalculateFeatureContribution (normalize: false) for a linear
        // model is w_i·x_i in score units. Lundberg & Lee 2017 (NeurIPS, Corollary 1) give
        // phi_i = w_i (x_i − E[x_i]); in log-odds that is −Slope·(FC_i − w_i·E[x_i]).
        var rows = SyntheticClaims.Generate(1500, seed: 3);
        var features = new ClaimFeatures(SyntheticClaims.Schema);
        var baseRows = rows.Select(r => features.Encode(r.Values)).ToList();
        var layout = new FeatureLayout(SyntheticClaims.Schema, MissingEncoding.MeanWithIndicator, Imputation.Fit(baseRows, features.Count));
        var x = baseRows.Select(layout.Complete).ToList();
        var weights = rows.Select(r => r.Weight).ToList();
        var ml = new MLContext(7);
        var fitted = MlNetTraining.Fit(ml, TrainerKind.Lbfgs, new ScoringOptions(), x, [.. rows.Select(r => r.IsFraud)], weights, layout.Count);

        var predictor = (BinaryPredictionTransformer<CalibratedModelParametersBase<LinearBinaryModelParameters, PlattCalibrator>>)fitted.MlNet;
        var w = predictor.Model.SubModel.Weights;
        var slope = predictor.Model.Calibrator.Slope;
        var fcc = ml.Transforms.CalculateFeatureContribution(predictor, layout.Count, layout.Count, normalize: false)
            .Fit(predictor.Transform(MlData.ToDataView(ml, x, null, null, layout.Count)));
        var reference = ml.Data.CreateEnumerable<Contributions>(
            fcc.Transform(predictor.Transform(MlData.ToDataView(ml, x, null, null, layout.Count))), reuseRowObject: false).ToList();

        var linear = fitted.Linear!;
        var phi = new double[layout.Count];
        for (var r = 0; r < x.Count; r++)
        {
            var logOdds = linear.Explain(x[r], phi);
            for (var i = 0; i < phi.Length; i++)
            {
                var expected = -slope * (reference[r].FeatureContributions[i] - w[i] * linear.Means[i]);
                Assert.Equal(expected, phi[i], 1e-5); // float contributions from ML.NET
            }
            // Local accuracy (Lundberg & Lee 2017, Property 1): E[f] + Σ phi = f(x), here in log-odds.
            Assert.Equal(logOdds, linear.ExpectedValue + phi.Sum(), 1e-9);
            Assert.Equal(-slope * reference[r].Score - predictor.Model.Calibrator.Offset, logOdds, 1e-4);
        }
    }
}
