namespace Triage.Testing.LightGbm;

/// <summary>
/// Seeded generated rows, row-major: features 0–3 are sometimes missing (NaN), 4–5 are often exactly 0,
/// the rest are continuous; the label follows a noisy logistic rule over a few of them.
/// </summary>
internal static class ClaimLikeData
{
    public static (double[] X, float[] Labels) Generate(int rows, int columns, int seed, double extraNaN = 0)
    {
        var rng = new Random(seed);
        var x = new double[rows * columns];
        var labels = new float[rows];
        for (var r = 0; r < rows; r++)
        {
            var row = x.AsSpan(r * columns, columns);
            for (var c = 0; c < columns; c++)
            {
                row[c] = c switch
                {
                    < 4 when rng.NextDouble() < 0.12 => double.NaN,
                    4 or 5 when rng.NextDouble() < 0.3 => 0.0,
                    _ => Normal(rng) * (1 + c % 3),
                };
                if (rng.NextDouble() < extraNaN) row[c] = double.NaN;
            }
            var logit = 0.8 * Value(row, 0) - 0.6 * Value(row, 1) + 0.5 * Value(row, 4) * Value(row, 2)
                + (double.IsNaN(row[3]) ? 1.0 : 0.3 * row[3]) - 0.4 * Math.Abs(Value(row, Math.Min(6, columns - 1))) + 0.3 * Normal(rng);
            labels[r] = rng.NextDouble() < 1 / (1 + Math.Exp(-logit)) ? 1f : 0f;
        }
        return (x, labels);
    }

    private static double Value(Span<double> row, int c) => double.IsNaN(row[c]) ? 0 : row[c];

    private static double Normal(Random rng) =>
        Math.Sqrt(-2 * Math.Log(1 - rng.NextDouble())) * Math.Cos(2 * Math.PI * rng.NextDouble());
}
