using Triage.Testing.LightGbm;
using System.Text.RegularExpressions;
using Triage.Scoring.Trees;

namespace Triage.Scoring.Tests.Trees;

/// <summary>The loader on text written by LightGBM 4.6.0 itself, intact and corrupted.</summary>
public class LightGbmModelTextTests
{
    private const int Columns = 6;
    private static readonly Lazy<string> SmallModel = new(() => TrainText("objective=binary num_leaves=7 verbose=-1 num_threads=1 seed=3 deterministic=true", 3));

    [Fact]
    public void Reads_single_leaf_trees_and_matches_native_raw_scores()
    {
        // More rows per leaf required than there are rows: LightGBM writes trees with one leaf.
        var text = TrainText("objective=binary min_data_in_leaf=5000 verbose=-1 num_threads=1", 2);
        Assert.Contains("num_leaves=1", text);
        var model = LightGbmModelText.Parse(text);
        Assert.All(model.Ensemble.Trees, t => Assert.Equal(0, t.InternalCount));

        var (x, labels) = ClaimLikeData.Generate(2000, Columns, seed: 9);
        using var native = LightGbmBooster.Train(x, labels, Columns, "verbose=-1", "objective=binary min_data_in_leaf=5000 verbose=-1 num_threads=1", 2);
        var raw = native.Predict(x[..(5 * Columns)], Columns, LightGbmBooster.PredictRaw);
        for (var r = 0; r < raw.Length; r++) Assert.Equal(raw[r], model.Ensemble.Predict(x.AsSpan(r * Columns, Columns)), 1e-12); // LightGBM raw score
    }

    [Fact]
    public void Reads_the_header()
    {
        var model = LightGbmModelText.Parse(SmallModel.Value);
        Assert.Equal("binary sigmoid:1", model.Objective);
        Assert.Equal(Enumerable.Range(0, Columns).Select(i => $"Column_{i}"), model.FeatureNames);
        Assert.Equal(Columns, model.Ensemble.FeatureCount);
        Assert.Equal(3, model.Ensemble.Trees.Count);
    }

    [Theory]
    [InlineData("hello", "the first line must be 'tree'")]
    [InlineData("", "the first line must be 'tree'")]
    public void Rejects_text_that_is_not_a_model(string text, string message) =>
        Assert.Contains(message, Reject(text));

    [Fact]
    public void Corrupt_values_name_the_tree_and_key()
    {
        var text = SmallModel.Value;
        Assert.Contains("Tree=1: key 'threshold' value 0 'abc' is not a number",
            Reject(ReplaceFirstValue(text, "Tree=1", "threshold", "abc")));
        Assert.Contains("Tree=0: key 'decision_type' node 0 is a categorical split",
            Reject(ReplaceFirstValue(text, "Tree=0", "decision_type", "9")));
        Assert.Contains("Tree=2: key 'left_child' node 0 points to node 99",
            Reject(ReplaceFirstValue(text, "Tree=2", "left_child", "99")));
        Assert.Contains("Tree 1 node 0: node 0 is reached twice",
            Reject(ReplaceFirstValue(text, "Tree=1", "left_child", "0")));
        Assert.Contains("Tree=0: key 'leaf_value' has 6 values; expected 7",
            Reject(Regex.Replace(text, @"(Tree=0\n(?:.*\n)*?leaf_value=)\S+ ", "$1")));
        Assert.Contains("Tree=2: key 'leaf_count' is missing",
            Reject(Regex.Replace(text, @"(Tree=2\n(?:.*\n)*?)leaf_count=.*\n", "$1")));
        Assert.Contains("the header: key 'num_class' must be 1",
            Reject(text.Replace("num_class=1", "num_class=3")));
        Assert.Contains("the header: key 'max_feature_idx' is missing",
            Reject(Regex.Replace(text, @"max_feature_idx=.*\n", "")));
        Assert.Contains("'end of trees' is missing after 3 trees",
            Reject(text[..text.IndexOf("end of trees", StringComparison.Ordinal)]));
        Assert.Contains("expected 'Tree=1' but found 'Tree=7'",
            Reject(text.Replace("Tree=1\n", "Tree=7\n")));
    }

    [Fact]
    public void Load_names_the_file()
    {
        var dir = Directory.CreateTempSubdirectory("triage-lgbm-");
        try
        {
            var good = Path.Combine(dir.FullName, "good.txt");
            var bad = Path.Combine(dir.FullName, "bad.txt");
            File.WriteAllText(good, SmallModel.Value);
            File.WriteAllText(bad, SmallModel.Value.Replace("num_class=1", "num_class=2"));
            Assert.Equal(3, LightGbmModelText.Load(good).Ensemble.Trees.Count);
            Assert.StartsWith(bad + ": ", Assert.Throws<InvalidDataException>(() => LightGbmModelText.Load(bad)).Message);
            Assert.Contains("missing.txt", Assert.Throws<InvalidDataException>(() => LightGbmModelText.Load(Path.Combine(dir.FullName, "missing.txt"))).Message);
        }
        finally
        {
            dir.Delete(recursive: true);
        }
    }

    private static string Reject(string text) => Assert.Throws<InvalidDataException>(() => LightGbmModelText.Parse(text)).Message;

    /// <summary>Replaces the first value of <paramref name="key"/> inside the block <paramref name="tree"/>.</summary>
    private static string ReplaceFirstValue(string text, string tree, string key, string value)
    {
        var block = text.IndexOf(tree + "\n", StringComparison.Ordinal);
        var line = text.IndexOf("\n" + key + "=", block, StringComparison.Ordinal) + key.Length + 2;
        var end = text.IndexOfAny([' ', '\n'], line);
        return text[..line] + value + text[end..];
    }

    private static string TrainText(string booster, int iterations)
    {
        var (x, labels) = ClaimLikeData.Generate(2000, Columns, seed: 9);
        using var native = LightGbmBooster.Train(x, labels, Columns, "verbose=-1", booster, iterations);
        return native.ModelText();
    }
}
