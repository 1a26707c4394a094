using System.Text.Json;
using System.Text.Json.Serialization;

namespace Triage.Scoring.Schema;

/// <summary>
/// The claim fields an insurer sends, as declared in a schema file (seed-cases/schema.json).
/// Raw claim values travel as invariant-culture strings keyed by field name: numbers with a
/// dot, dates as yyyy-MM-dd, yes/no as "yes"/"no", an empty or absent value as missing.
/// Columns whose name starts with '_' are hidden (generator truth) and never read.
/// </summary>
public sealed record ClaimSchema(
    string Name,
    int Version,
    SchemaRoles Roles,
    IReadOnlyList<FieldSpec> Fields,
    IReadOnlyList<DerivedSpec> Derived)
{
    public static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        WriteIndented = true,
        DefaultIgnoreCondition = JsonIgnoreCondition.WhenWritingNull,
        Converters = { new JsonStringEnumConverter(JsonNamingPolicy.CamelCase) },
    };

    public FieldSpec Field(string name) =>
        Fields.FirstOrDefault(f => f.Name == name)
        ?? throw new KeyNotFoundException($"The schema has no field '{name}'.");

    /// <summary>Fields and derived values the model may learn from, in schema order.</summary>
    [JsonIgnore]
    public IEnumerable<string> FeatureNames =>
        Fields.Where(f => f.Feature).Select(f => f.Name).Concat(Derived.Where(d => d.Feature).Select(d => d.Name));

    public static ClaimSchema Load(string path)
    {
        try
        {
            var schema = JsonSerializer.Deserialize<ClaimSchema>(File.ReadAllText(path), Json)
                ?? throw new InvalidDataException("empty document");
            schema.Validate();
            return schema;
        }
        catch (Exception e) when (e is JsonException or InvalidDataException or NotSupportedException)
        {
            throw new InvalidDataException($"Schema file '{path}' is not valid: {e.Message}", e);
        }
    }

    public string ToJson() => JsonSerializer.Serialize(this, Json);

    /// <summary>Checks names are unique, roles point at real fields, and no protected field is a feature.</summary>
    public void Validate()
    {
        var names = Fields.Select(f => f.Name).Concat(Derived.Select(d => d.Name)).ToList();
        var dup = names.GroupBy(n => n).FirstOrDefault(g => g.Count() > 1);
        if (dup is not null) throw new InvalidDataException($"Field '{dup.Key}' is declared twice.");
        foreach (var role in new[] { Roles.ClaimNumber, Roles.Line, Roles.Amount, Roles.ReportDate })
            if (!Fields.Any(f => f.Name == role))
                throw new InvalidDataException($"Role field '{role}' is not declared.");
        foreach (var f in Fields.Where(f => f.Protected && f.Feature))
            throw new ProtectedFieldException(f.Name);
        foreach (var d in Derived)
            foreach (var src in d.Sources)
                if (!Fields.Any(f => f.Name == src))
                    throw new InvalidDataException($"Derived field '{d.Name}' reads unknown field '{src}'.");
        foreach (var d in Derived.Where(d => d.Feature && d.Sources.Any(s => Field(s).Protected)))
            throw new ProtectedFieldException(d.Name);
    }
}

/// <summary>Which fields play the parts every claim has.</summary>
public sealed record SchemaRoles(
    string ClaimNumber,
    string Line,
    string Amount,
    string ReportDate,
    string? LossDate = null,
    string? PolicyStart = null,
    string? ClaimantName = null);

public enum FieldType { Number, Category, YesNo, Date, Text }

public sealed record FieldSpec(
    string Name,
    FieldType Type,
    string DisplayName,
    string Description,
    string? Unit = null,
    double? Min = null,
    double? Max = null,
    IReadOnlyList<string>? Categories = null,
    bool MissingAllowed = false,
    bool Protected = false,
    bool Feature = false,
    bool Identifier = false);

public enum DerivedKind
{
    /// <summary>Whole days from <c>Sources[0]</c> to <c>Sources[1]</c> (both dates).</summary>
    DaysBetween,
    /// <summary>Day of the month (1–31) of the date in <c>Sources[0]</c>.</summary>
    DayOfMonth,
    /// <summary><c>Sources[0]</c> divided by <c>Sources[1]</c> (numbers); missing when the divisor is 0.</summary>
    Ratio,
}

public sealed record DerivedSpec(
    string Name,
    DerivedKind Kind,
    IReadOnlyList<string> Sources,
    string DisplayName,
    string Description,
    string? Unit = null,
    bool Feature = true);

public sealed class ProtectedFieldException(string field)
    : InvalidOperationException($"Field '{field}' is protected and can never be a model feature.")
{
    public string Field { get; } = field;
}
