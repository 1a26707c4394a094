using System.Text.Json;
using System.Text.Json.Serialization;
using Triage.Cases.Domain;
using Triage.Scoring.Schema;

namespace Triage.Cases.FirstStart;

public sealed record Scenario(string Insurer, int Seed, DateOnly AsOf, int HistoryRows, int OpenRows, double FraudRate);

public sealed record TeamFile(IReadOnlyList<TeamMember> People);

public sealed record TeamMember(string UserName, string DisplayName, string Email, IReadOnlyList<string> Roles,
    IReadOnlyList<string> Lines, int DailyCapacity);

public sealed record PlaybookFile(IReadOnlyList<PlaybookRuleDto> Rules);

public sealed record PlaybookRuleDto(string Field, string Direction, PlaybookConditionDto? Condition,
    IReadOnlyList<PlaybookCheckDto> Checks, string Basis);

public sealed record PlaybookConditionDto(string Op, JsonElement Value);

public sealed record PlaybookCheckDto(string Title, string Detail);

/// <summary>Reads the JSON files of a seed folder; every complaint names the file and the entry.</summary>
public static class SeedFiles
{
    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        Converters = { new JsonStringEnumConverter(JsonNamingPolicy.CamelCase) },
    };

    public static T Read<T>(string path)
    {
        if (!File.Exists(path)) throw new FileNotFoundException($"Seed file '{path}' is missing.", path);
        try
        {
            return JsonSerializer.Deserialize<T>(File.ReadAllText(path), Json)
                ?? throw new InvalidDataException($"Seed file '{path}' is empty.");
        }
        catch (JsonException e)
        {
            throw new InvalidDataException($"Seed file '{path}' is not valid: {e.Message}", e);
        }
    }

    public static IReadOnlyList<PlaybookRule> Playbook(string path, ClaimSchema schema)
    {
        var known = schema.Fields.Select(f => f.Name).Concat(schema.Derived.Select(d => d.Name)).ToHashSet();
        return Read<PlaybookFile>(path).Rules.Select((r, i) =>
        {
            var where = $"{path}, rule {i + 1} ({r.Field})";
            if (!known.Contains(r.Field)) throw new InvalidDataException($"{where}: the schema has no field '{r.Field}'.");
            if (!Enum.TryParse<DriverDirection>(r.Direction, ignoreCase: true, out var direction))
                throw new InvalidDataException($"{where}: direction must be 'raises' or 'lowers' (got '{r.Direction}').");
            ConditionOp? op = null;
            if (r.Condition is { } c)
                op = Enum.TryParse<ConditionOp>(c.Op, ignoreCase: true, out var parsed)
                    ? parsed
                    : throw new InvalidDataException($"{where}: condition op must be one of lt, lte, gt, gte, eq, in (got '{c.Op}').");
            try
            {
                return new PlaybookRule(r.Field, direction, op, r.Condition?.Value.GetRawText(), r.Basis,
                    r.Checks.Select(x => new PlaybookCheck(x.Title, x.Detail)));
            }
            catch (DomainRuleException e)
            {
                throw new InvalidDataException($"{where}: {e.Message}", e);
            }
        }).ToList();
    }

    public static void CheckTeam(string path, TeamFile team)
    {
        foreach (var p in team.People)
        {
            var unknown = p.Roles.FirstOrDefault(r => !Roles.All.Contains(r));
            if (unknown is not null)
                throw new InvalidDataException($"{path}, person '{p.UserName}': unknown role '{unknown}' (use {string.Join(", ", Roles.All)}).");
        }
    }
}
