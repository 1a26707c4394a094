using Microsoft.ML;
using Microsoft.ML.Data;

namespace Triage.Scoring.Training;

/// <summary>The rows ML.NET sees: a float vector whose width is only known at run time.</summary>
internal static class MlData
{
    public sealed class Row
    {
        public float[] Features { get; set; } = [];
        public bool Label { get; set; }
        public float Weight { get; set; } = 1f;
    }

    public const string Features = nameof(Row.Features);
    public const string Label = nameof(Row.Label);
    public const string Weight = nameof(Row.Weight);

    public static IDataView ToDataView(MLContext ml, IEnumerable<double[]> x, IReadOnlyList<bool>? labels, IReadOnlyList<double>? weights, int width)
    {
        var definition = SchemaDefinition.Create(typeof(Row));
        definition[Features].ColumnType = new VectorDataViewType(NumberDataViewType.Single, width);
        var rows = x.Select((r, i) => new Row
        {
            Features = [.. r.Select(v => (float)v)],
            Label = labels?[i] ?? false,
            Weight = (float)(weights?[i] ?? 1.0),
        }).ToList();
        return ml.Data.LoadFromEnumerable(rows, definition);
    }
}
