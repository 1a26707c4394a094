using Microsoft.Extensions.Options;
using Microsoft.ML;
using Triage.Scoring.Drift;
using Triage.Scoring.Drivers;
using Triage.Scoring.Features;
using Triage.Scoring.Metrics;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Training;

/// <summary>
/// Trains a model version from labelled claims. The claims reported in the last HoldoutMonths (by the
/// schema's report date) are held out for metrics; the saved model is the one fitted on the earlier
/// claims only, so its holdout metrics describe exactly the model that ships (no refit on all rows).
/// </summary>
public sealed class ModelTrainer(IOptions<ScoringOptions> options)
{
    public ScoringModel Train(ClaimSchema schema, IReadOnlyList<LabelledClaim> rows, TrainingRequest request,
        IProgress<TrainingProgress>? progress = null, CancellationToken ct = default)
    {
        var o = request.Settings ?? options.Value;
        var kind = request.Trainer ?? o.Trainer;
        var features = new ClaimFeatures(schema);
        if (rows.Count == 0) throw new InvalidDataException("There are no labelled claims to train on.");
        progress?.Report(new("Reading claims", 0.0));

        var (trainIdx, holdoutIdx) = TimeSplit.Split(schema, rows, o.HoldoutMonths);
        var train = trainIdx.Select(i => rows[i]).ToList();
        var holdout = holdoutIdx.Select(i => rows[i]).ToList();
        if (!train.Any(r => r.IsFraud) || train.All(r => r.IsFraud))
            throw new InvalidDataException($"The {train.Count} claims before the {o.HoldoutMonths}-month holdout need both fraud and non-fraud labels.");
        foreach (var (r, i) in rows.Select((r, i) => (r, i)))
            if (!(r.Weight > 0) || double.IsInfinity(r.Weight))
                throw new InvalidDataException($"Training row {i + 1}: weight {r.Weight} must be a finite number above 0.");

        var trainBase = Encode(features, train, trainIdx);
        var missing = kind == TrainerKind.Lbfgs ? MissingEncoding.MeanWithIndicator : MissingEncoding.BelowRange;
        var imputation = missing == MissingEncoding.MeanWithIndicator ? Imputation.Fit(trainBase, features.Count) : null;
        var layout = new FeatureLayout(schema, missing, imputation);
        var trainX = trainBase.Select(layout.Complete).ToList();
        ct.ThrowIfCancellationRequested();

        // What needs no fitted model (the rows' fingerprint, field statistics, the fields' drift bins) is worked
        // out beside the ML.NET fit rather than after it.
        var beside = Task.Run(() =>
        {
            IReadOnlyList<IReadOnlyDictionary<string, string?>> trainValues = [.. train.Select(r => r.Values)];
            var numeric = NumericColumns.Parse(schema, trainValues);
            return (Hash: TrainingDataHash.Compute(schema, rows),
                Stats: FieldStats.Compute(schema, trainValues, numeric),
                DriftFields: DriftBaseline.FieldBins(schema, train, numeric));
        }, ct);
        var ml = new MLContext(o.Seed);
        FittedModel fitted;
        try
        {
            progress?.Report(new("Training", 0.1));
            fitted = MlNetTraining.Fit(ml, kind, o, trainX, [.. train.Select(r => r.IsFraud)], [.. train.Select(r => r.Weight)], layout.Count,
                () => progress?.Report(new("Preparing the explainer", 0.7)));
            ct.ThrowIfCancellationRequested();
        }
        catch
        {
            // Leave nothing running behind a failed or cancelled fit.
            try { beside.Wait(CancellationToken.None); } catch (Exception) { /* the fit's own failure is the one to report */ }
            throw;
        }

        progress?.Report(new("Checking on the holdout", 0.8));
        var holdoutX = Encode(features, holdout, holdoutIdx).Select(layout.Complete).ToList();
        var p = holdoutX.Select(x => ScoringModel.Sigmoid(fitted.Trees?.Predict(x) ?? fitted.Linear!.Predict(x))).ToList();
        var y = holdout.Select(r => r.IsFraud).ToList();
        var metrics = new HoldoutMetrics(BinaryMetrics.RocAuc(p, y), BinaryMetrics.AveragePrecision(p, y), BinaryMetrics.Brier(p, y), BinaryMetrics.LogLoss(p, y));

        progress?.Report(new("Recording statistics and the drift baseline", 0.9));
        var (hash, stats, driftFields) = beside.GetAwaiter().GetResult();
        var drift = DriftBaseline.WithScores(driftFields, train, [.. fitted.TrainLogOdds.Select(ScoringModel.Sigmoid)]);
        var metadata = new ModelMetadata(request.Version, kind, DateTime.UtcNow, hash,
            train.Count, holdout.Count, train.Sum(r => r.IsFraud ? r.Weight : 0) / train.Sum(r => r.Weight), metrics, request.TrainedBy);
        var part = new ExplainerPart(layout.Columns, missing, fitted.Trees, fitted.Linear, imputation);
        progress?.Report(new("Serialising the ML.NET model", 0.96));
        var model = new ScoringModel(metadata, schema, part, stats, SaveMlNet(ml, fitted, layout.Count), drift);
        progress?.Report(new("Done", 1.0));
        return model;
    }

    /// <summary>Encodes rows in parallel (each row on its own; order kept), naming the first bad row.</summary>
    private static List<double[]> Encode(ClaimFeatures features, List<LabelledClaim> rows, List<int> index)
    {
        var result = new double[rows.Count][];
        var firstBad = new InvalidDataException?[rows.Count];
        Parallel.For(0, rows.Count, k =>
        {
            try { result[k] = features.Encode(rows[k].Values); }
            catch (InvalidDataException e) { firstBad[k] = e; }
        });
        for (var k = 0; k < rows.Count; k++)
            if (firstBad[k] is { } e) throw new InvalidDataException($"Training row {index[k] + 1}: {e.Message}", e);
        return [.. result];
    }

    private static byte[] SaveMlNet(MLContext ml, FittedModel fitted, int width)
    {
        using var stream = new MemoryStream();
        ml.Model.Save(fitted.MlNet, MlData.ToDataView(ml, [], null, null, width).Schema, stream);
        return stream.ToArray();
    }
}
