using Microsoft.ML;
using Microsoft.ML.Data;

namespace Triage.Bench.Retrain;

/// <summary>Rows for the bare ML.NET fit, built the way any ML.NET user would (a class and a schema definition).</summary>
internal static class BenchRows
{
    private sealed class Row
    {
        public float[] Features { get; set; } = [];
        public bool Label { get; set; }
        public float Weight { get; set; }
    }

    public static IDataView ToDataView(MLContext ml, IReadOnlyList<double[]> x, bool[] y, double[] w, int width)
    {
        var definition = SchemaDefinition.Create(typeof(Row));
        definition[nameof(Row.Features)].ColumnType = new VectorDataViewType(NumberDataViewType.Single, width);
        return ml.Data.LoadFromEnumerable(x.Select((r, i) => new Row { Features = [.. r.Select(v => (float)v)], Label = y[i], Weight = (float)w[i] }).ToList(), definition);
    }
}
