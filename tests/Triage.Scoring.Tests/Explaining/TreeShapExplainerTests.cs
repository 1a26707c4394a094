using Triage.Scoring.Explaining;
using Triage.Scoring.Trees;

namespace Triage.Scoring.Tests.Explaining;

public class TreeShapExplainerTests
{
    [Theory]
    [InlineData(1, 1, 3, 1, true)]
    [InlineData(2, 1, 6, 3, true)]
    [InlineData(3, 3, 8, 5, true)]
    [InlineData(4, 5, 8, 6, true)]
    [InlineData(5, 4, 7, 7, false)]
    [InlineData(6, 2, 2, 6, true)]
    public void Matches_brute_force_shapley_values(int seed, int trees, int features, int depth, bool consistentCovers)
    {
        var random = new RandomTrees(seed);
        var ensemble = random.Ensemble(trees, features, depth, consistentCovers);
        var explainer = new TreeShapExplainer(ensemble);
        var phi = new double[features];

        // Shapley 1953 over all subsets, value = EXPVALUE of Lundberg, Erion & Lee 2018 (Algorithm 1).
        Assert.Equal(BruteForceShapley.Value(ensemble, new double[features], 0), explainer.ExpectedValue, 1e-10);
        for (var row = 0; row < 40; row++)
        {
            var x = random.Row(features);
            var output = explainer.Explain(x, phi);
            var expected = BruteForceShapley.Attributions(ensemble, x);
            for (var i = 0; i < features; i++) Assert.Equal(expected[i], phi[i], 1e-10);
            Assert.Equal(BruteForceShapley.Value(ensemble, x, (1 << features) - 1), output, 1e-10);
        }
    }

    [Fact]
    public void Brute_force_rows_cover_every_missing_rule_on_nan_and_zero()
    {
        // Guards the exactness test above: its random trees must really route NaN and 0 by every rule.
        var random = new RandomTrees(3);
        var ensemble = random.Ensemble(3, 8, 5);
        var kinds = ensemble.Trees.SelectMany(t => t.Missing).Distinct().Count();
        var repeated = ensemble.Trees.Any(t => t.SplitFeature.GroupBy(f => f).Any(g => g.Count() > 1));
        Assert.Equal(4, kinds);
        Assert.True(repeated);
    }

    [Fact]
    public void Reproduces_figure_1_of_lundberg_erion_lee_2018()
    {
        // Lundberg, Erion & Lee 2018 (arXiv:1802.03888), Figure 1: two binary features (fever, cough),
        // 500 training rows in each of the four cells. Model A: 80 when both are on. Model B: A + 10
        // when cough is on. At (on, on): A gives phi = 30, 30 around a base of 20; B gives 30, 35 around 25.
        var modelA = new TreeEnsemble([TwoSplits(0, 0, 0, 80)], [1.0], 0, 2);
        var modelB = new TreeEnsemble([TwoSplits(0, 10, 0, 90)], [1.0], 0, 2);
        var modelBAsSum = new TreeEnsemble([TwoSplits(0, 0, 0, 80), CoughStump(10)], [1.0, 1.0], 0, 2);
        double[] onOn = [1, 1];
        var phi = new double[2];

        var a = new TreeShapExplainer(modelA);
        Assert.Equal(80, a.Explain(onOn, phi), 1e-12);
        Assert.Equal(20, a.ExpectedValue, 1e-12);
        Assert.Equal(30, phi[0], 1e-12);
        Assert.Equal(30, phi[1], 1e-12);

        foreach (var b in new[] { new TreeShapExplainer(modelB), new TreeShapExplainer(modelBAsSum) })
        {
            Assert.Equal(90, b.Explain(onOn, phi), 1e-12);
            Assert.Equal(25, b.ExpectedValue, 1e-12);
            Assert.Equal(30, phi[0], 1e-12);
            Assert.Equal(35, phi[1], 1e-12);
        }
    }

    [Theory]
    [InlineData(11, 40, 12, 8)]
    [InlineData(12, 200, 12, 6)]
    [InlineData(13, 10, 30, 12)]
    public void Attributions_add_up_to_the_prediction(int seed, int trees, int features, int depth)
    {
        // Local accuracy (Lundberg & Lee 2017, property 1): E[f] + Σ phi = f(x), here against TreeEnsemble.Predict.
        var random = new RandomTrees(seed);
        var ensemble = random.Ensemble(trees, features, depth);
        var explainer = new TreeShapExplainer(ensemble);
        var phi = new double[features];
        for (var row = 0; row < 300; row++)
        {
            var x = random.Row(features);
            var predicted = ensemble.Predict(x);
            var output = explainer.Explain(x, phi);
            var tolerance = 1e-9 * Math.Max(1, Math.Abs(predicted));
            Assert.Equal(predicted, output, tolerance);
            Assert.Equal(predicted, explainer.ExpectedValue + phi.Sum(), tolerance);
        }
    }

    [Fact]
    public void Clears_phi_and_gives_the_same_answer_on_every_thread()
    {
        var random = new RandomTrees(21);
        var ensemble = random.Ensemble(30, 10, 7);
        var explainer = new TreeShapExplainer(ensemble);
        var rows = Enumerable.Range(0, 400).Select(_ => random.Row(10)).ToArray();
        var serial = rows.Select(x => { var p = new double[10]; explainer.Explain(x, p); return p; }).ToArray();
        var parallel = new double[rows.Length][];
        Parallel.For(0, rows.Length, new ParallelOptions { MaxDegreeOfParallelism = 4 }, r =>
        {
            var p = Enumerable.Repeat(123.0, 12).ToArray(); // stale values and spare room must not leak in
            explainer.Explain(rows[r], p);
            Assert.Equal(123.0, p[11]);
            parallel[r] = p[..10];
        });
        for (var r = 0; r < rows.Length; r++) Assert.Equal(serial[r], parallel[r]);
    }

    [Fact]
    public void Explaining_a_row_allocates_nothing()
    {
        var random = new RandomTrees(31);
        var ensemble = random.Ensemble(50, 12, 9);
        var explainer = new TreeShapExplainer(ensemble);
        var rows = Enumerable.Range(0, 200).Select(_ => random.Row(12)).ToArray();
        var phi = new double[12];
        explainer.Explain(rows[0], phi); // first call on this thread sizes its scratch buffers
        var before = GC.GetAllocatedBytesForCurrentThread();
        foreach (var x in rows) explainer.Explain(x, phi);
        Assert.Equal(before, GC.GetAllocatedBytesForCurrentThread());
    }

    [Fact]
    public void Single_leaf_trees_only_move_the_expected_value()
    {
        var leaf = new RegressionTree([], [], [], [], [], [], [], [2.5], [7]);
        var ensemble = new TreeEnsemble([leaf, TwoSplits(0, 0, 0, 80)], [2.0, 1.0], 0.5, 2);
        var explainer = new TreeShapExplainer(ensemble);
        var phi = new double[2];
        Assert.Equal(0.5 + 5.0 + 20, explainer.ExpectedValue, 1e-12);
        Assert.Equal(ensemble.Predict([1, 1]), explainer.Explain([1, 1], phi), 1e-12);
        Assert.Equal(60, phi.Sum(), 1e-12);
    }

    [Fact]
    public void Rejects_trees_it_cannot_explain_with_the_tree_and_node()
    {
        var zeroCover = TwoSplits(0, 0, 0, 80) with { NodeCover = [2000, 0, 1000] };
        var badFeature = TwoSplits(0, 0, 0, 80) with { SplitFeature = [0, 5, 1] };
        var cycle = TwoSplits(0, 0, 0, 80) with { Left = [1, 0, ~2] };
        Assert.Contains("Tree 1 node 1: cover is 0", Reject(zeroCover));
        Assert.Contains("Tree 1 node 1: split feature 5", Reject(badFeature));
        Assert.Contains("Tree 1 node 1: node 0 is reached twice", Reject(cycle));

        var explainer = new TreeShapExplainer(new TreeEnsemble([TwoSplits(0, 0, 0, 80)], [1.0], 0, 2));
        Assert.Throws<ArgumentException>(() => explainer.Explain([1.0], new double[2]));
        Assert.Throws<ArgumentException>(() => explainer.Explain([1.0, 1.0], new double[1]));

        static string Reject(RegressionTree tree) =>
            Assert.Throws<ArgumentException>(() => new TreeShapExplainer(new TreeEnsemble([CoughStump(1), tree], [1, 1], 0, 2))).Message;
    }

    /// <summary>Feature 0 at the root, feature 1 below on both sides; leaves (off,off), (off,on), (on,off), (on,on), 500 rows each.</summary>
    private static RegressionTree TwoSplits(double offOff, double offOn, double onOff, double onOn) => new(
        SplitFeature: [0, 1, 1],
        Threshold: [0.5, 0.5, 0.5],
        Left: [1, ~0, ~2],
        Right: [2, ~1, ~3],
        Missing: [MissingRouting.Compare, MissingRouting.Compare, MissingRouting.Compare],
        DefaultLeft: [false, false, false],
        NodeCover: [2000, 1000, 1000],
        LeafValue: [offOff, offOn, onOff, onOn],
        LeafCover: [500, 500, 500, 500]);

    private static RegressionTree CoughStump(double whenOn) => new(
        [1], [0.5], [~0], [~1], [MissingRouting.Compare], [false], [2000], [0, whenOn], [1000, 1000]);
}
