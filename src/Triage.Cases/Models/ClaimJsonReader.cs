using System.Buffers;
using System.Text;
using System.Text.Json;
using Triage.Scoring.Schema;

namespace Triage.Cases.Models;

/// <summary>
/// Reads a claim's stored values (a JSON object of strings or nulls) into the dictionary JsonSerializer would
/// give, except that the schema's field names and declared levels are shared between rows instead of being
/// allocated for each one: 50,000 rows then hold one copy of "line" and "home" rather than 50,000, which
/// keeps the garbage collector out of the way of the fit that follows. Short number and date values repeat
/// too (a few hundred report dates, small counts): within one <see cref="Batch"/> each is kept once.
/// </summary>
internal sealed class ClaimJsonReader(ClaimSchema schema)
{
    private sealed record Known(byte[] Utf8, string Text);
    private sealed record KnownField(Known Name, Known[] Levels, bool Repeats);

    /// <summary>Values up to this many characters are looked up before a new string is made for them.</summary>
    private const int ShortValue = 16;
    private const int MaxShared = 8_192;

    /// <summary>The short values seen so far by one worker; not shared between threads.</summary>
    public sealed class Batch
    {
        internal readonly Dictionary<string, string> Seen = new(StringComparer.Ordinal);
    }

    private static readonly Known[] YesNo = [new("yes"u8.ToArray(), "yes"), new("no"u8.ToArray(), "no")];

    private readonly KnownField[] _fields = [.. schema.Fields.Select(f => new KnownField(
        new Known(Encoding.UTF8.GetBytes(f.Name), f.Name),
        f.Type == FieldType.YesNo ? YesNo : [.. (f.Categories ?? []).Select(l => new Known(Encoding.UTF8.GetBytes(l), l))],
        f.Type is FieldType.Number or FieldType.Date))];

    public Dictionary<string, string?> Read(string json, Batch batch)
    {
        var buffer = ArrayPool<byte>.Shared.Rent(Encoding.UTF8.GetMaxByteCount(json.Length));
        try
        {
            var reader = new Utf8JsonReader(buffer.AsSpan(0, Encoding.UTF8.GetBytes(json, buffer)));
            return Read(ref reader, batch.Seen);
        }
        finally
        {
            ArrayPool<byte>.Shared.Return(buffer);
        }
    }

    private Dictionary<string, string?> Read(ref Utf8JsonReader reader, Dictionary<string, string> seen)
    {
        var values = new Dictionary<string, string?>(_fields.Length + 4);
        // A stored "null" reads as no values, as it did through JsonSerializer.
        if (reader.Read() && reader.TokenType == JsonTokenType.Null && !reader.Read()) return values;
        if (reader.TokenType != JsonTokenType.StartObject) throw new JsonException("A claim's stored values are not a JSON object.");
        var hint = 0;
        while (reader.Read() && reader.TokenType == JsonTokenType.PropertyName)
        {
            var field = FieldAt(ref reader, hint);
            var name = field is null ? reader.GetString()! : field.Name.Text;
            if (field is not null) hint = Array.IndexOf(_fields, field) + 1;
            reader.Read();
            values[name] = reader.TokenType switch
            {
                JsonTokenType.Null => null,
                JsonTokenType.String when field is null => reader.GetString(),
                JsonTokenType.String => Match(ref reader, field.Levels) ?? (field.Repeats ? Shared(ref reader, seen) : reader.GetString()),
                _ => throw new JsonException($"The stored value of '{name}' is not a string."),
            };
        }
        if (reader.TokenType != JsonTokenType.EndObject || reader.Read()) throw new JsonException("A claim's stored values are not one JSON object.");
        return values;
    }

    /// <summary>The schema field this property names: stored claims list fields in schema order, so the next one is tried first.</summary>
    private KnownField? FieldAt(ref Utf8JsonReader reader, int hint)
    {
        for (var k = 0; k < _fields.Length; k++)
        {
            var f = _fields[(hint + k) % _fields.Length];
            if (reader.ValueTextEquals(f.Name.Utf8)) return f;
        }
        return null;
    }

    private static string Shared(ref Utf8JsonReader reader, Dictionary<string, string> seen)
    {
        if (reader.ValueIsEscaped || reader.HasValueSequence || reader.ValueSpan.Length > ShortValue) return reader.GetString()!;
        Span<char> chars = stackalloc char[ShortValue];
        var text = chars[..Encoding.UTF8.GetChars(reader.ValueSpan, chars)];
        var lookup = seen.GetAlternateLookup<ReadOnlySpan<char>>();
        if (lookup.TryGetValue(text, out var known)) return known;
        var value = new string(text);
        if (seen.Count < MaxShared) seen[value] = value;
        return value;
    }

    private static string? Match(ref Utf8JsonReader reader, Known[] levels)
    {
        foreach (var l in levels) if (reader.ValueTextEquals(l.Utf8)) return l.Text;
        return null;
    }
}
