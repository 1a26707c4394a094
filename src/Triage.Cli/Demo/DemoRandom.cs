namespace Triage.Cli.Demo;

/// <summary>
/// The one source of randomness of a demo run. System.Random with an explicit seed is the same
/// sequence on every platform and .NET version, so a seed pins every byte of the output as long as
/// the callers draw in a fixed order.
/// </summary>
internal sealed class DemoRandom(int seed)
{
    private readonly Random _random = new(seed);

    public double Uniform() => _random.NextDouble();

    public double Uniform(double min, double max) => min + (max - min) * _random.NextDouble();

    /// <summary>An integer in [min, max], both ends included.</summary>
    public int Int(int min, int max) => _random.Next(min, max + 1);

    public bool Chance(double p) => _random.NextDouble() < p;

    public T Pick<T>(IReadOnlyList<T> items) => items[_random.Next(items.Count)];

    public T PickWeighted<T>(IReadOnlyList<(T Item, double Weight)> weighted)
    {
        var u = _random.NextDouble() * weighted.Sum(w => w.Weight);
        foreach (var (item, weight) in weighted)
        {
            if (u < weight) return item;
            u -= weight;
        }
        return weighted[^1].Item;
    }

    /// <summary>Standard normal draw (Box–Muller, one of the pair).</summary>
    public double Normal()
    {
        var u1 = 1.0 - _random.NextDouble();
        var u2 = _random.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2.0 * Math.PI * u2);
    }

    /// <summary>Exponential draw with the given mean, floored to whole units.</summary>
    public int Exponential(double mean) => (int)Math.Floor(-mean * Math.Log(1.0 - _random.NextDouble()));
}
