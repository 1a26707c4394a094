using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;
using Triage.Scoring.Explaining;

namespace Triage.Cases.Tests.CaseWork;

public sealed class DriverWaterfallTests
{
    [Fact]
    public void Steps_run_from_the_base_rate_to_the_score_raising_first_then_lowering_largest_first()
    {
        // Base −1.5 log-odds: logistic(−1.5) = 1/(1+e^1.5) = 0.1824255238 (standard logistic function, computed by hand).
        // Effects apportion score − base by contribution, as Triage.Scoring documents (docs/explanations.md).
        double[] phi = [0.9, -0.2, 0.4, -0.6, 0];
        var logOdds = -1.5 + phi.Sum();
        var p = 1 / (1 + Math.Exp(-logOdds));
        var spread = (p - 0.1824255238) * 100;
        var drivers = phi.Select((x, i) => new Driver($"f{i}", $"Field {i}", "v", x, spread * x / phi.Sum(), "typical")).ToList();
        var c = Case.Open(Build.Claim(), new Explanation(-1.5, logOdds, p, drivers), "v", new Dictionary<string, string?>(), [],
            Build.Now, 5, Actor.System);

        var w = DriverWaterfall.Of(c);

        Assert.Equal(18.24255238, w.BasePoints, 6);
        Assert.Equal(["f0", "f2", "f3", "f1"], w.Steps.Select(s => s.Driver.Field));
        Assert.Equal(w.BasePoints, w.Steps[0].From, 9);
        for (var i = 1; i < w.Steps.Count; i++) Assert.Equal(w.Steps[i - 1].To, w.Steps[i].From, 9);
        Assert.Equal(p * 100, w.Steps[^1].To, 6);
        Assert.Equal(p * 100, w.ScorePoints, 9);
        Assert.Equal((18.24255238, w.Steps[1].To), (Math.Round(w.Range().Low, 8), w.Range().High));
    }
}
