using System.Runtime.CompilerServices;
using System.Text.Json;
using Triage.Scoring.Schema;

namespace Triage.Cases.Intake;

/// <summary>
/// Reads a JSON array of claim objects, streamed element by element. Values may be strings, numbers,
/// true/false (read as yes/no) or null; a field left out is empty; a property the schema lacks is an error.
/// </summary>
internal static class JsonClaimReader
{
    public static async IAsyncEnumerable<IncomingRow> ReadAsync(Stream stream, ClaimSchema schema, [EnumeratorCancellation] CancellationToken ct)
    {
        var known = schema.Fields.Select(f => f.Name).ToHashSet();
        var elements = JsonSerializer.DeserializeAsyncEnumerable<JsonElement>(stream, cancellationToken: ct).GetAsyncEnumerator(ct);
        var row = 0;
        while (true)
        {
            RowError? failure = null;
            var more = false;
            try { more = await elements.MoveNextAsync(); }
            catch (JsonException e)
            {
                failure = new RowError(row + 1, null, null,
                    $"the body is not a valid JSON array of claim objects (line {e.LineNumber + 1}, byte {e.BytePositionInLine + 1}): {e.Message.Split(" Path:")[0]}");
            }
            if (failure is not null) { yield return IncomingRow.Stop(failure); break; }
            if (!more) break;
            row++;
            yield return ToRow(row, elements.Current, known);
        }
        await elements.DisposeAsync();
    }

    private static IncomingRow ToRow(int row, JsonElement element, HashSet<string> known)
    {
        if (element.ValueKind != JsonValueKind.Object) return IncomingRow.Broken(row, $"the element is a JSON {element.ValueKind.ToString().ToLowerInvariant()}, not an object");
        var cells = new Dictionary<string, string?>();
        var errors = new List<RowError>();
        foreach (var p in element.EnumerateObject())
        {
            if (p.Name.StartsWith('_')) continue;
            if (!known.Contains(p.Name)) { errors.Add(new RowError(row, p.Name, null, "the schema has no such field")); continue; }
            string? text;
            try { text = Text(p.Value); }
            catch (InvalidOperationException)
            {
                errors.Add(new RowError(row, p.Name, null, "the value holds bytes that are not UTF-8; send the body as UTF-8"));
                continue;
            }
            if (!cells.TryAdd(p.Name, text))
                errors.Add(new RowError(row, p.Name, null, "the field appears more than once"));
            else if (p.Value.ValueKind is JsonValueKind.Object or JsonValueKind.Array)
                errors.Add(new RowError(row, p.Name, null, "the value must be a string, a number, true/false or null"));
        }
        foreach (var name in known.Where(k => !cells.ContainsKey(k))) cells[name] = null;
        return new IncomingRow(row, cells, errors);
    }

    private static string? Text(JsonElement v) => v.ValueKind switch
    {
        JsonValueKind.String => v.GetString(),
        JsonValueKind.Number => v.GetRawText(),
        JsonValueKind.True => "yes",
        JsonValueKind.False => "no",
        _ => null,
    };
}
