using System.Globalization;

namespace Triage.Scoring.Trees;

/// <summary>
/// Reads the text LightGBM writes with <c>SaveModelToString</c> / <c>save_model</c>: a header, one
/// <c>Tree=k</c> block per tree, then <c>end of trees</c>. Numerical splits only; one output (binary or
/// regression). Anything else is rejected with an <see cref="InvalidDataException"/> naming the tree and key.
/// </summary>
public static class LightGbmModelText
{
    public static LightGbmModel Load(string path)
    {
        string text;
        try
        {
            text = File.ReadAllText(path);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new InvalidDataException($"Cannot read the LightGBM model '{path}': {e.Message}", e);
        }
        try
        {
            return Parse(text);
        }
        catch (InvalidDataException e)
        {
            throw new InvalidDataException($"{path}: {e.Message}", e);
        }
    }

    public static LightGbmModel Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var lines = text.Split('\n').Select(l => l.TrimEnd('\r')).ToArray();
        var at = 0;
        while (at < lines.Length && lines[at].Length == 0) at++;
        if (at == lines.Length || lines[at] != "tree")
            throw new InvalidDataException("Not a LightGBM model text: the first line must be 'tree'.");

        var header = new Block("the header");
        for (at++; at < lines.Length && !lines[at].StartsWith("Tree=", StringComparison.Ordinal); at++)
        {
            if (lines[at] == "end of trees") break;
            header.Add(lines[at]);
        }
        var featureCount = header.Int("max_feature_idx") + 1;
        if (featureCount < 1) throw header.Error("max_feature_idx", "must be >= 0");
        var names = header.Text("feature_names").Split(' ', StringSplitOptions.RemoveEmptyEntries);
        if (names.Length != featureCount)
            throw header.Error("feature_names", $"has {names.Length} names but max_feature_idx says {featureCount} features");
        if (header.Int("num_class") != 1) throw header.Error("num_class", "must be 1 (multiclass models are not supported)");
        if (header.Has("num_tree_per_iteration") && header.Int("num_tree_per_iteration") != 1)
            throw header.Error("num_tree_per_iteration", "must be 1");
        var objective = header.Text("objective");

        var trees = new List<RegressionTree>();
        var ended = false;
        while (at < lines.Length && !ended)
        {
            var line = lines[at++];
            if (line == "end of trees") ended = true;
            else if (line.StartsWith("Tree=", StringComparison.Ordinal))
            {
                var name = line;
                if (line != $"Tree={trees.Count}")
                    throw new InvalidDataException($"LightGBM model text: expected 'Tree={trees.Count}' but found '{line}'.");
                var block = new Block(name);
                for (; at < lines.Length && lines[at].Length > 0 && !lines[at].StartsWith("Tree=", StringComparison.Ordinal) && lines[at] != "end of trees"; at++)
                    block.Add(lines[at]);
                trees.Add(ReadTree(block, featureCount));
            }
            else if (line.Length > 0) throw new InvalidDataException($"LightGBM model text: unexpected line '{line}' between trees.");
        }
        if (!ended) throw new InvalidDataException($"LightGBM model text is cut short: 'end of trees' is missing after {trees.Count} trees.");
        if (trees.Count == 0) throw new InvalidDataException("LightGBM model text has no trees.");

        // Leaf values already include the shrinkage (LightGBM multiplies them in when it adds a tree).
        // Random-forest mode averages the trees; the binary objective's sigmoid scales raw score to log-odds.
        var weight = (header.HasFlag("average_output") ? 1.0 / trees.Count : 1.0) * BinarySigmoid(header, objective);
        var ensemble = new TreeEnsemble(trees, Enumerable.Repeat(weight, trees.Count).ToArray(), 0.0, featureCount);
        try
        {
            TreeValidation.Check(ensemble);
        }
        catch (ArgumentException e)
        {
            throw new InvalidDataException($"LightGBM model text: {e.Message}", e);
        }
        return new LightGbmModel(ensemble, names, objective);
    }

    private static double BinarySigmoid(Block header, string objective)
    {
        var parts = objective.Split(' ', StringSplitOptions.RemoveEmptyEntries);
        if (parts.Length == 0 || parts[0] != "binary") return 1.0;
        var sigmoid = parts.FirstOrDefault(p => p.StartsWith("sigmoid:", StringComparison.Ordinal));
        if (sigmoid is null) return 1.0;
        if (!double.TryParse(sigmoid["sigmoid:".Length..], NumberStyles.Float, CultureInfo.InvariantCulture, out var s) || !(s > 0) || !double.IsFinite(s))
            throw header.Error("objective", $"has an unreadable sigmoid '{sigmoid}'");
        return s;
    }

    private static RegressionTree ReadTree(Block block, int featureCount)
    {
        var leaves = block.Int("num_leaves");
        if (leaves < 1) throw block.Error("num_leaves", "must be >= 1");
        if (block.Has("num_cat") && block.Int("num_cat") != 0)
            throw block.Error("num_cat", "is not 0: categorical splits are not supported");
        if (block.Has("is_linear") && block.Int("is_linear") != 0)
            throw block.Error("is_linear", "is not 0: linear trees are not supported");
        var n = leaves - 1;
        var leafValue = block.Doubles("leaf_value", leaves);
        if (n == 0)
            return new RegressionTree([], [], [], [], [], [], [], leafValue, block.Has("leaf_count") && block.Text("leaf_count").Length > 0 ? block.Doubles("leaf_count", 1) : [1.0]);

        var feature = block.Ints("split_feature", n);
        var decision = block.Ints("decision_type", n);
        var left = block.Ints("left_child", n);
        var right = block.Ints("right_child", n);
        var missing = new MissingRouting[n];
        var defaultLeft = new bool[n];
        for (var i = 0; i < n; i++)
        {
            if ((uint)feature[i] >= (uint)featureCount)
                throw block.Error("split_feature", $"node {i} splits on feature {feature[i]}, outside 0..{featureCount - 1}");
            if ((decision[i] & 1) != 0) throw block.Error("decision_type", $"node {i} is a categorical split; categorical splits are not supported");
            defaultLeft[i] = (decision[i] & 2) != 0;
            missing[i] = ((decision[i] >> 2) & 3) switch
            {
                0 => MissingRouting.AsZero,          // None: NaN is read as 0
                1 => MissingRouting.ZeroDefaultWay,  // Zero: 0 (and NaN, read as 0) go the default way
                2 => MissingRouting.DefaultWay,      // NaN: NaN goes the default way
                _ => throw block.Error("decision_type", $"node {i} has missing type 3, which LightGBM does not define"),
            };
            foreach (var (key, child) in new[] { ("left_child", left[i]), ("right_child", right[i]) })
                if (child >= n || ~child >= leaves)
                    throw block.Error(key, $"node {i} points to {(child >= 0 ? $"node {child}" : $"leaf {~child}")}, which does not exist");
        }
        return new RegressionTree(feature, block.Doubles("threshold", n), left, right, missing, defaultLeft,
            block.Doubles("internal_count", n), leafValue, block.Doubles("leaf_count", leaves));
    }

    /// <summary>The key=value lines of the header or of one tree, with messages that name both.</summary>
    private sealed class Block(string name)
    {
        private readonly Dictionary<string, string> _values = [];
        private readonly HashSet<string> _flags = [];

        public void Add(string line)
        {
            var eq = line.IndexOf('=');
            if (eq < 0)
            {
                if (line.Length > 0) _flags.Add(line);
                return;
            }
            _values[line[..eq]] = line[(eq + 1)..];
        }

        public bool Has(string key) => _values.ContainsKey(key);

        public bool HasFlag(string flag) => _flags.Contains(flag);

        public string Text(string key) =>
            _values.TryGetValue(key, out var v) ? v.Trim() : throw new InvalidDataException($"LightGBM model text, {name}: key '{key}' is missing.");

        public int Int(string key) => Ints(key, 1)[0];

        public int[] Ints(string key, int count) =>
            Parse<int>(key, count, s => int.TryParse(s, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var v) ? v : null);

        public double[] Doubles(string key, int count) => Parse<double>(key, count, ParseDouble);

        public InvalidDataException Error(string key, string problem) => new($"LightGBM model text, {name}: key '{key}' {problem}.");

        private T[] Parse<T>(string key, int count, Func<string, T?> parse) where T : struct
        {
            var items = Text(key).Split(' ', StringSplitOptions.RemoveEmptyEntries);
            if (items.Length != count) throw Error(key, $"has {items.Length} values; expected {count}");
            var result = new T[count];
            for (var i = 0; i < count; i++)
                result[i] = parse(items[i]) ?? throw Error(key, $"value {i} '{items[i]}' is not a number");
            return result;
        }

        private static double? ParseDouble(string s) => s switch
        {
            "inf" or "+inf" => double.PositiveInfinity,
            "-inf" => double.NegativeInfinity,
            _ => double.TryParse(s, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) ? v : null,
        };
    }
}
