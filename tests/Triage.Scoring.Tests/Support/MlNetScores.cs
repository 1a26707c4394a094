using Microsoft.ML;
using Triage.Scoring.Models;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Support;

/// <summary>Runs the ML.NET model stored inside a model file on claims, for comparisons with our numbers.</summary>
public static class MlNetScores
{
    public sealed class Scored
    {
        public float Score { get; set; }
        public float Probability { get; set; }
    }

    public static List<Scored> Score(ScoringModel model, IEnumerable<IReadOnlyDictionary<string, string?>> claims)
    {
        var ml = new MLContext(1);
        var x = claims.Select(model.Layout.Encode).ToList();
        var scored = model.LoadMlNet(ml).Transform(MlData.ToDataView(ml, x, null, null, model.Layout.Count));
        return [.. ml.Data.CreateEnumerable<Scored>(scored, reuseRowObject: false)];
    }
}
