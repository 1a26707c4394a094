using Triage.Scoring.Schema;

namespace Triage.Scoring.Drift;

/// <summary>One field's (or the score's) drift: PSI, its band, and the expected and actual share of each bin.</summary>
public sealed record FieldDrift(string Name, DriftBinKind Kind, double Psi, DriftBand Band, IReadOnlyList<DriftBinShare> Bins);

public sealed record DriftBinShare(string Label, double Expected, double Actual);

/// <summary>Counts recent claims into a baseline's bins, one claim at a time, so a caller can stream them.</summary>
public sealed class DriftTally(ClaimSchema schema, DriftBaseline baseline)
{
    private readonly double[][] _fields = [.. baseline.Fields.Select(f => new double[f.Count])];
    private readonly double[] _score = new double[baseline.Score.Count];

    public int Claims { get; private set; }

    public void Add(IReadOnlyDictionary<string, string?> claim, double score)
    {
        for (var f = 0; f < _fields.Length; f++) _fields[f][baseline.Fields[f].BinOf(schema, claim)]++;
        _score[baseline.Score.BinOf(score)]++;
        Claims++;
    }

    public IReadOnlyList<FieldDrift> Fields() => [.. baseline.Fields.Select((b, f) => Result(b, _fields[f]))];

    public FieldDrift Score() => Result(baseline.Score, _score);

    private static FieldDrift Result(DriftBins bins, double[] counts)
    {
        var actual = Psi.Shares(counts);
        var psi = Psi.Compute(bins.Expected, actual);
        var labels = bins.Labels();
        return new FieldDrift(bins.Name, bins.Kind, psi, Psi.Band(psi),
            [.. labels.Select((l, i) => new DriftBinShare(l, bins.Expected[i], actual[i]))]);
    }
}
