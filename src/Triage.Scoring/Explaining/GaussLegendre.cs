namespace Triage.Scoring.Explaining;

/// <summary>
/// Gauss–Legendre quadrature on [0, 1]: n nodes integrate every polynomial of degree up to 2n − 1
/// exactly (Abramowitz &amp; Stegun 1964, §25.4.29). Nodes are the roots of the Legendre polynomial
/// P_n, found by Newton's method from the classic cosine guess.
/// </summary>
internal static class GaussLegendre
{
    public static (double[] Nodes, double[] Weights) OnUnitInterval(int n)
    {
        var nodes = new double[n];
        var weights = new double[n];
        for (var i = 0; i < n; i++)
        {
            var x = Math.Cos(Math.PI * (i + 0.75) / (n + 0.5));
            double derivative;
            for (var step = 0; ; step++)
            {
                (var p, derivative) = Legendre(n, x);
                var dx = p / derivative;
                x -= dx;
                if (Math.Abs(dx) <= 1e-16 || step == 100) break;
            }
            (_, derivative) = Legendre(n, x);
            // Map [-1, 1] to [0, 1]: t = (1 − x) / 2 puts the nodes in increasing order.
            nodes[i] = (1 - x) / 2;
            weights[i] = 1 / ((1 - x * x) * derivative * derivative);
        }
        return (nodes, weights);
    }

    /// <summary>P_n(x) and P_n'(x) by the three-term recurrence.</summary>
    private static (double Value, double Derivative) Legendre(int n, double x)
    {
        double previous = 1, current = x;
        for (var k = 2; k <= n; k++) (previous, current) = (current, ((2 * k - 1) * x * current - (k - 1) * previous) / k);
        if (n == 0) return (1, 0);
        return (current, n * (x * current - previous) / (x * x - 1));
    }
}
