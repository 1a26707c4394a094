using System.CommandLine;
using System.Globalization;
using CsvHelper;
using Microsoft.Extensions.Options;
using Triage.Cases.Hosting;
using Triage.Cli.Explain;
using Triage.Scoring;
using Triage.Scoring.Models;
using Triage.Scoring.Schema;
using Triage.Scoring.Training;

namespace Triage.Cli.Tests.Explain;

[Collection(Triage.Cli.Tests.Support.ConsoleCollection.Name)]
public sealed class ExplainCommandTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("triage-explain-").FullName;

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    private static int Run(params string[] args)
    {
        var root = new RootCommand { ExplainCommand.Create() };
        return root.Parse(args).Invoke();
    }

    [Fact]
    public void Explains_a_claims_csv_with_a_triage_model_in_row_order()
    {
        var schema = ClaimSchema.Load(Path.Combine(TriageHome.Locate(), "seed-cases", "schema.json"));
        var claims = SmallClaims.Generate(schema, 900, seed: 4);
        var options = new ScoringOptions { FastTree = new() { NumberOfTrees = 30, NumberOfLeaves = 8, MinimumExampleCountPerLeaf = 10, LearningRate = 0.2 } };
        var model = new ModelTrainer(Options.Create(options)).Train(schema, claims, new TrainingRequest("cli-test"));
        var modelPath = Path.Combine(_dir, "model.triage");
        model.Save(modelPath);
        var input = Path.Combine(_dir, "claims.csv");
        SmallClaims.WriteCsv(input, schema, claims.Take(250).Select(c => c.Values));
        var output = Path.Combine(_dir, "out.csv");

        Assert.Equal(0, Run("explain", "--model", modelPath, "--input", input, "--output", output, "--batch-size", "7"));

        var (header, rows) = ReadCsv(output);
        Assert.Equal(["base_value", "log_odds", "probability", .. model.Fields], header);
        Assert.Equal(250, rows.Count);
        for (var r = 0; r < rows.Count; r++)
        {
            // Reference: the library's own explanation of the same claim (row order must survive batching).
            var e = model.Explain(claims[r].Values);
            Assert.Equal(e.BaseValue, Num(rows[r][0]));
            Assert.Equal(e.LogOdds, Num(rows[r][1]));
            Assert.Equal(e.Probability, Num(rows[r][2]));
            for (var f = 0; f < model.Fields.Count; f++) Assert.Equal(e[model.Fields[f]].Contribution, Num(rows[r][3 + f]));
            Assert.Equal(Num(rows[r][1]), Num(rows[r][0]) + rows[r].Skip(3).Sum(Num), 1e-9);
        }
    }

    [Fact]
    public void Explains_a_feature_csv_with_a_lightgbm_model_text()
    {
        var modelPath = Path.Combine(_dir, "model.txt");
        File.WriteAllText(modelPath, TwoStumps);
        var input = Path.Combine(_dir, "features.csv");
        File.WriteAllText(input, "id,b,a\n1,1,3\n2,4,8\n3,,8\n");
        var output = Path.Combine(_dir, "out.csv");

        Assert.Equal(0, Run("explain", "--model", modelPath, "--input", input, "--output", output));

        var (header, rows) = ReadCsv(output);
        Assert.Equal(["base_value", "log_odds", "probability", "a", "b"], header);
        // Worked by hand. A single split's Shapley value is f(x) − E[f] (Shapley 1953, one player);
        // E over the leaf counts: tree a: (30·−0.5 + 70·0.5)/100 = 0.2; tree b: (40·0.3 + 60·−0.2)/100 = 0.
        // Base = 0.2. Row 1: a=3 → −0.5 (φa −0.7), b=1 → 0.3 (φb 0.3): log-odds −0.2.
        // Row 3: b missing; missing type None reads NaN as 0 → left (LightGBM docs, decision_type) → 0.3.
        double[][] expected = [[0.2, -0.2, -0.7, 0.3], [0.2, 0.3, 0.3, -0.2], [0.2, 0.8, 0.3, 0.3]];
        for (var r = 0; r < 3; r++)
        {
            Assert.Equal(expected[r][0], Num(rows[r][0]), 1e-12);
            Assert.Equal(expected[r][1], Num(rows[r][1]), 1e-12);
            Assert.Equal(1 / (1 + Math.Exp(-expected[r][1])), Num(rows[r][2]), 1e-12);
            Assert.Equal(expected[r][2], Num(rows[r][3]), 1e-12);
            Assert.Equal(expected[r][3], Num(rows[r][4]), 1e-12);
        }
    }

    [Fact]
    public void A_bad_value_names_file_row_and_column_and_writes_nothing()
    {
        var modelPath = Path.Combine(_dir, "model.txt");
        File.WriteAllText(modelPath, TwoStumps);
        var input = Path.Combine(_dir, "features.csv");
        File.WriteAllText(input, "a,b\n1,1\n2,x\n");
        var output = Path.Combine(_dir, "out.csv");
        var error = new StringWriter();
        var previous = Console.Error;
        Console.SetError(error);
        try { Assert.Equal(1, Run("explain", "--model", modelPath, "--input", input, "--output", output)); }
        finally { Console.SetError(previous); }
        Assert.Contains($"Input '{input}' row 2 (line 3): column 'b': 'x' is not a number.", error.ToString());
        Assert.False(File.Exists(output));
        Assert.Equal(2, Directory.GetFiles(_dir).Length);
    }

    [Fact]
    public void A_missing_feature_column_is_named()
    {
        var modelPath = Path.Combine(_dir, "model.txt");
        File.WriteAllText(modelPath, TwoStumps);
        var input = Path.Combine(_dir, "features.csv");
        File.WriteAllText(input, "a,c\n1,1\n");
        var error = new StringWriter();
        var previous = Console.Error;
        Console.SetError(error);
        try { Assert.Equal(1, Run("explain", "--model", modelPath, "--input", input, "--output", Path.Combine(_dir, "out.csv"))); }
        finally { Console.SetError(previous); }
        Assert.Contains("has no column 'b', a feature of the model", error.ToString());
    }

    private static double Num(string s) => double.Parse(s, CultureInfo.InvariantCulture);

    private static (string[] Header, List<string[]> Rows) ReadCsv(string path)
    {
        using var reader = CsvReader.FromFile(path);
        var rows = new List<string[]>();
        string[]? header = null;
        while (reader.Read())
        {
            header ??= [.. reader.Headers];
            rows.Add([.. Enumerable.Range(0, header.Length).Select(reader.GetString)]);
        }
        return (header ?? [.. reader.Headers], rows);
    }

    // Two one-split trees in LightGBM 4 model text: tree 0 splits feature a at 5, tree 1 feature b at 2.
    // decision_type 2 = default left, missing type None (NaN read as 0).
    private const string TwoStumps = """
        tree
        version=v4
        num_class=1
        num_tree_per_iteration=1
        label_index=0
        max_feature_idx=1
        objective=binary sigmoid:1
        feature_names=a b
        feature_infos=[0:10] [0:5]

        Tree=0
        num_leaves=2
        num_cat=0
        split_feature=0
        split_gain=1
        threshold=5
        decision_type=2
        left_child=-1
        right_child=-2
        leaf_value=-0.5 0.5
        leaf_count=30 70
        internal_value=0
        internal_count=100
        is_linear=0
        shrinkage=1

        Tree=1
        num_leaves=2
        num_cat=0
        split_feature=1
        split_gain=1
        threshold=2
        decision_type=2
        left_child=-1
        right_child=-2
        leaf_value=0.3 -0.2
        leaf_count=40 60
        internal_value=0
        internal_count=100
        is_linear=0
        shrinkage=1

        end of trees
        """;
}
