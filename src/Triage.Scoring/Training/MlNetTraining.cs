using Microsoft.ML;
using Microsoft.ML.Calibrators;
using Microsoft.ML.Data;
using Microsoft.ML.Trainers;
using Microsoft.ML.Trainers.FastTree;
using Triage.Scoring.Linear;
using Triage.Scoring.Trees;

namespace Triage.Scoring.Training;

/// <summary>A fitted ML.NET model, the same model in log-odds for our explainers, and its log-odds for each training row.</summary>
internal sealed record FittedModel(ITransformer MlNet, TreeEnsemble? Trees, LinearExplainer? Linear, double[] TrainLogOdds);

/// <summary>
/// Fits one of the three trainers so that every output is a Platt-calibrated probability:
/// FastTree carries its own Platt calibrator; FastForest gets a Platt calibrator fitted on its
/// training scores; L-BFGS logistic regression's calibrator is the logistic link itself, a Platt
/// sigmoid with slope −1 and offset 0 fitted jointly with the weights by maximum likelihood.
/// <c>fitted</c> is called once ML.NET's part is done, before the conversion for the explainers.
/// </summary>
internal static class MlNetTraining
{
    public static FittedModel Fit(MLContext ml, TrainerKind kind, ScoringOptions options,
        IReadOnlyList<double[]> x, IReadOnlyList<bool> labels, IReadOnlyList<double> weights, int width,
        Action? fitted = null)
    {
        var data = MlData.ToDataView(ml, x, labels, weights, width);
        switch (kind)
        {
            case TrainerKind.FastTree:
            {
                var s = options.FastTree;
                var model = ml.BinaryClassification.Trainers.FastTree(new FastTreeBinaryTrainer.Options
                {
                    LabelColumnName = MlData.Label, FeatureColumnName = MlData.Features, ExampleWeightColumnName = MlData.Weight,
                    NumberOfTrees = s.NumberOfTrees, NumberOfLeaves = s.NumberOfLeaves,
                    MinimumExampleCountPerLeaf = s.MinimumExampleCountPerLeaf, LearningRate = s.LearningRate,
                }).Fit(data);
                fitted?.Invoke();
                var cal = model.Model.Calibrator;
                var trees = TreeConversion.ToLogOdds(model.Model.SubModel.TrainedTreeEnsemble, 1.0, cal.Slope, cal.Offset, x, weights, width);
                return new(model, trees.Ensemble, null, trees.TrainLogOdds);
            }
            case TrainerKind.FastForest:
            {
                var s = options.FastForest;
                var forest = ml.BinaryClassification.Trainers.FastForest(new FastForestBinaryTrainer.Options
                {
                    LabelColumnName = MlData.Label, FeatureColumnName = MlData.Features, ExampleWeightColumnName = MlData.Weight,
                    NumberOfTrees = s.NumberOfTrees, NumberOfLeaves = s.NumberOfLeaves,
                    MinimumExampleCountPerLeaf = s.MinimumExampleCountPerLeaf,
                }).Fit(data);
                var platt = ml.BinaryClassification.Calibrators.Platt(MlData.Label, "Score", MlData.Weight).Fit(forest.Transform(data));
                var cal = ((ISingleFeaturePredictionTransformer<PlattCalibrator>)platt).Model;
                fitted?.Invoke();
                var ensemble = forest.Model.TrainedTreeEnsemble;
                // ML.NET 5.0.1's forest Score is the plain sum of its trees (weights 1, no averaging), checked
                // against ML.NET's Score in the tests; the Platt slope absorbs the scale.
                var trees = TreeConversion.ToLogOdds(ensemble, 1.0, cal.Slope, cal.Offset, x, weights, width);
                return new(new TransformerChain<ITransformer>(forest, platt), trees.Ensemble, null, trees.TrainLogOdds);
            }
            case TrainerKind.Lbfgs:
            {
                var s = options.Lbfgs;
                var model = ml.BinaryClassification.Trainers.LbfgsLogisticRegression(new LbfgsLogisticRegressionBinaryTrainer.Options
                {
                    LabelColumnName = MlData.Label, FeatureColumnName = MlData.Features, ExampleWeightColumnName = MlData.Weight,
                    L1Regularization = s.L1Regularization, L2Regularization = s.L2Regularization,
                }).Fit(data);
                fitted?.Invoke();
                var linear = ToLogOdds(model.Model.SubModel, model.Model.Calibrator, x, weights);
                return new(model, null, linear, [.. x.Select(r => linear.Predict(r))]);
            }
            default:
                throw new ArgumentOutOfRangeException(nameof(kind), kind, "Unknown trainer.");
        }
    }

    /// <summary>log-odds = −Slope·(w·x + b) − Offset, with weighted training means for the centring.</summary>
    private static LinearExplainer ToLogOdds(LinearBinaryModelParameters linear, PlattCalibrator cal, IReadOnlyList<double[]> x, IReadOnlyList<double> weights)
    {
        var w = linear.Weights.Select(v => -cal.Slope * v).ToArray();
        var means = new double[w.Length];
        var total = weights.Sum();
        for (var r = 0; r < x.Count; r++)
            for (var j = 0; j < means.Length; j++) means[j] += weights[r] * x[r][j] / total;
        return new LinearExplainer(w, -cal.Slope * linear.Bias - cal.Offset, means);
    }
}
