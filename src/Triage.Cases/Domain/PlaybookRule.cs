using System.Globalization;
using System.Text.Json;
using Triage.Scoring.Features;

namespace Triage.Cases.Domain;

public enum DriverDirection { Raises, Lowers }

public enum ConditionOp { Lt, Lte, Gt, Gte, Eq, In }

/// <summary>One playbook entry: when a driver on this field moves risk this way (and its value meets
/// the condition, if any), suggest these checks.</summary>
public sealed class PlaybookRule
{
    private PlaybookRule() { }

    public PlaybookRule(string field, DriverDirection direction, ConditionOp? op, string? conditionValueJson,
        string basis, IEnumerable<PlaybookCheck> checks)
    {
        if (string.IsNullOrWhiteSpace(field)) throw new DomainRuleException("A playbook rule needs a field.");
        if ((op is null) != (conditionValueJson is null))
            throw new DomainRuleException($"Playbook rule on '{field}': a condition needs both an operator and a value.");
        Field = field;
        Direction = direction;
        ConditionOp = op;
        ConditionValueJson = conditionValueJson;
        Basis = basis;
        Checks = checks.ToList();
        if (Checks.Count == 0) throw new DomainRuleException($"Playbook rule on '{field}' suggests no checks.");
    }

    public int Id { get; private set; }
    public string Field { get; private set; } = "";
    public DriverDirection Direction { get; private set; }
    public ConditionOp? ConditionOp { get; private set; }
    /// <summary>The condition's value as JSON: a number, a string, or an array of strings for 'in'.</summary>
    public string? ConditionValueJson { get; private set; }
    public string Basis { get; private set; } = "";
    public List<PlaybookCheck> Checks { get; private set; } = [];

    /// <summary>Whether this rule applies to a driver, given the feature values the model scored.</summary>
    public bool Matches(DriverSnapshot driver, IReadOnlyDictionary<string, string?> scoredValues)
    {
        if (driver.Field != Field || driver.Contribution == 0) return false;
        if ((Direction == DriverDirection.Raises) != driver.Raises) return false;
        if (ConditionOp is not { } op) return true;
        var raw = ClaimValues.Raw(scoredValues, Field);
        if (raw is null) return false;
        using var doc = JsonDocument.Parse(ConditionValueJson!);
        var expected = doc.RootElement;
        if (expected.ValueKind == JsonValueKind.Number)
        {
            if (!double.TryParse(raw, NumberStyles.Float, CultureInfo.InvariantCulture, out var x)) return false;
            var v = expected.GetDouble();
            return op switch
            {
                Domain.ConditionOp.Lt => x < v,
                Domain.ConditionOp.Lte => x <= v,
                Domain.ConditionOp.Gt => x > v,
                Domain.ConditionOp.Gte => x >= v,
                Domain.ConditionOp.Eq => x == v,
                _ => false,
            };
        }
        return op switch
        {
            Domain.ConditionOp.Eq => raw == Text(expected),
            Domain.ConditionOp.In => expected.ValueKind == JsonValueKind.Array && expected.EnumerateArray().Any(e => Text(e) == raw),
            _ => false,
        };
    }

    private static string? Text(JsonElement e) =>
        e.ValueKind == JsonValueKind.Number ? e.GetDouble().ToString(CultureInfo.InvariantCulture) : e.ToString();
}

public sealed class PlaybookCheck
{
    private PlaybookCheck() { }

    public PlaybookCheck(string title, string detail)
    {
        Title = title;
        Detail = detail;
    }

    public string Title { get; private set; } = "";
    public string Detail { get; private set; } = "";
}
