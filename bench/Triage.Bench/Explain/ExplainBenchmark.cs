using System.Diagnostics;
using Triage.Testing.LightGbm;
using Triage.Scoring.Explaining;
using Triage.Scoring.Trees;

namespace Triage.Bench.Explain;

/// <summary>
/// Our TreeSHAP against LightGBM's native contributions (C_API_PREDICT_CONTRIB) on the same booster
/// and rows: 200 trees × 31 leaves (leaf-wise), 12 features with NaNs, 10,000 rows.
/// </summary>
internal static class ExplainBenchmark
{
    private const int Columns = 12, Trees = 200, Rows = 10_000, Block = 1_000;

    public static int Run()
    {
        var (trainX, labels) = ClaimLikeData.Generate(20_000, Columns, seed: 1);
        var (x, _) = ClaimLikeData.Generate(Rows, Columns, seed: 2, extraNaN: 0.03);
        Console.WriteLine($"training LightGBM: {Trees} trees, 31 leaves, {Columns} features, 20,000 rows ...");
        using var booster = LightGbmBooster.Train(trainX, labels, Columns, "max_bin=255 min_data_in_bin=1 verbose=-1",
            "objective=binary num_leaves=31 learning_rate=0.1 verbose=-1 num_threads=1 seed=7 deterministic=true", Trees);
        var model = LightGbmModelText.Parse(booster.ModelText());
        var explainer = new TreeShapExplainer(model.Ensemble);
        Console.WriteLine($"model: {model.Ensemble.Trees.Count} trees, deepest leaf at depth {MaxDepth(model.Ensemble)}");
        var cores = Environment.ProcessorCount;

        var phi = new double[Rows * Columns];
        var native = new double[Rows * (Columns + 1)];
        ExplainRows(explainer, x, phi, 0, Rows); // warm up: let tiered JIT reach its optimised code
        booster.Predict(x[..(100 * Columns)], Columns, LightGbmBooster.PredictContrib);

        // Alternate blocks of rows between the two so that load from other processes hits both alike.
        double ours1 = 0, native1 = 0;
        for (var block = 0; block < Rows; block += Block)
        {
            ours1 += Time(() => ExplainRows(explainer, x, phi, block, Block));
            native1 += Time(() => booster.Predict(x.AsSpan(block * Columns, Block * Columns).ToArray(), Columns, LightGbmBooster.PredictContrib, "num_threads=1")
                .CopyTo(native, block * (Columns + 1)));
        }
        var maxDiff = MaxDifference(explainer, phi, native);

        var oursN = Time(() => ExplainParallel(explainer, x, phi));
        var nativeN = Time(() => native = booster.Predict(x, Columns, LightGbmBooster.PredictContrib, $"num_threads={cores}"));
        maxDiff = Math.Max(maxDiff, MaxDifference(explainer, phi, native));

        Report("ours, 1 thread", ours1);
        Report("LightGBM native, 1 thread", native1);
        Report($"ours, {cores} threads", oursN);
        Report($"LightGBM native, {cores} threads", nativeN);
        Console.WriteLine($"max |difference| of contributions (incl. expected value): {maxDiff:E2}");
        Console.WriteLine($"explain speedup vs native ({cores} threads): {nativeN / oursN:F2}");
        DemoOpenClaims.Run();
        Console.WriteLine($"explain speedup vs native (1 thread): {native1 / ours1:F2}");
        return maxDiff <= 1e-9 ? 0 : 1;
    }

    private static void ExplainRows(TreeShapExplainer explainer, double[] x, double[] phi, int first, int count)
    {
        for (var r = first; r < first + count; r++) explainer.Explain(x.AsSpan(r * Columns, Columns), phi.AsSpan(r * Columns, Columns));
    }

    private static void ExplainParallel(TreeShapExplainer explainer, double[] x, double[] phi) =>
        Parallel.For(0, Rows / 100, chunk =>
            ExplainRows(explainer, x, phi, chunk * 100, 100));

    private static double MaxDifference(TreeShapExplainer explainer, double[] phi, double[] native)
    {
        var max = 0.0;
        for (var r = 0; r < Rows; r++)
        {
            for (var c = 0; c < Columns; c++) max = Math.Max(max, Math.Abs(phi[r * Columns + c] - native[r * (Columns + 1) + c]));
            max = Math.Max(max, Math.Abs(explainer.ExpectedValue - native[r * (Columns + 1) + Columns]));
        }
        return max;
    }

    private static double Time(Action action)
    {
        var watch = Stopwatch.StartNew();
        action();
        return watch.Elapsed.TotalSeconds;
    }

    private static void Report(string what, double seconds) =>
        Console.WriteLine($"{what,-32} {Rows / seconds,12:N0} rows/s  ({seconds * 1000 / Rows:F3} ms/row)");

    private static int MaxDepth(TreeEnsemble ensemble) => ensemble.Trees.Max(t => t.InternalCount == 0 ? 0 : Depth(t, 0));

    private static int Depth(RegressionTree tree, int node) =>
        node < 0 ? 0 : 1 + Math.Max(Depth(tree, tree.Left[node]), Depth(tree, tree.Right[node]));
}
