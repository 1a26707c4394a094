using System.Text.Json;

namespace Triage.Cases.Instances;

/// <summary>
/// A notice one app instance sends the others: a case changed (<see cref="CaseId"/>) or the serving model
/// changed (<see cref="Model"/>). <see cref="From"/> is the sender's <see cref="InstanceId"/>, so an
/// instance can skip its own notices, which it has already acted on.
/// </summary>
public sealed record InstanceNotice(string From, string What, int? CaseId = null, string? Model = null)
{
    private static readonly JsonSerializerOptions Json = new(JsonSerializerDefaults.Web)
    {
        DefaultIgnoreCondition = System.Text.Json.Serialization.JsonIgnoreCondition.WhenWritingNull,
    };

    public string ToPayload() => JsonSerializer.Serialize(this, Json);

    /// <returns>Null when the payload is not a notice of ours.</returns>
    public static InstanceNotice? FromPayload(string payload)
    {
        try
        {
            var n = JsonSerializer.Deserialize<InstanceNotice>(payload, Json);
            return n is { From.Length: > 0, What.Length: > 0 } ? n : null;
        }
        catch (JsonException)
        {
            return null;
        }
    }
}

/// <summary>This process's name among the instances: the machine, the process and a random part (two hosts in one process differ).</summary>
public sealed class InstanceId
{
    public string Value { get; } = $"{Environment.MachineName}/{Environment.ProcessId}/{Guid.NewGuid().ToString("N")[..6]}";

    public override string ToString() => Value;
}

/// <summary>Where notices for the other instances go. With SQLite there is one instance, so they go nowhere.</summary>
public interface IInstanceNotices
{
    /// <summary>Queues a notice for the other instances; never blocks and never throws.</summary>
    void Send(InstanceNotice notice);
}

/// <summary>The SQLite store serves one instance: nobody else to tell.</summary>
public sealed class SingleInstance : IInstanceNotices
{
    public void Send(InstanceNotice notice) { }
}
