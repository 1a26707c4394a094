using System.Text.Json;
using Triage.Cases.Models;
using Triage.Cases.Tests.Intake;

namespace Triage.Cases.Tests.Models;

/// <summary>The retrain's claim reader must give exactly what System.Text.Json's own dictionary deserialisation gives.</summary>
public class ClaimJsonReaderTests
{
    public static TheoryData<string> Stored => new()
    {
        // Reference: JsonSerializer.Deserialize<Dictionary<string, string?>> on the same text (System.Text.Json).
        JsonSerializer.Serialize(new Dictionary<string, string?> { ["claim_number"] = "LM-23-000001", ["line"] = "home", ["loss_date"] = "2023-11-30", ["claimed_amount"] = "1656.07", ["police_report"] = "yes" }),
        // Fields out of schema order, unknown and hidden keys, nulls, empty and padded values.
        """{"_planted":"x","police_report":null,"line":"","loss_hour":" 8 ","extra":"1","report_date":"2023-12-01"}""",
        // Escapes in names and values, non-ASCII text, a level spelt with an escape, a value longer than the shared ones.
        """{"claimant_name":"Ysel\u00e9de \"Q\"","l\u0069ne":"mot\u006fr","repairer_code":"RP-05","claimed_amount":"12345678901234567890.5"}""",
        "{}",
        "null",
    };

    [Theory]
    [MemberData(nameof(Stored))]
    public void Reads_what_JsonSerializer_reads(string json)
    {
        var expected = JsonSerializer.Deserialize<Dictionary<string, string?>>(json) ?? [];
        var reader = new ClaimJsonReader(IntakeRows.Schema);
        var batch = new ClaimJsonReader.Batch();
        // Twice with one batch: the second read comes from the shared names, levels and short values.
        Assert.Equal(expected.OrderBy(p => p.Key, StringComparer.Ordinal), reader.Read(json, batch).OrderBy(p => p.Key, StringComparer.Ordinal));
        Assert.Equal(expected.OrderBy(p => p.Key, StringComparer.Ordinal), reader.Read(json, batch).OrderBy(p => p.Key, StringComparer.Ordinal));
    }

    [Theory]
    [InlineData("""{"line":1}""")]
    [InlineData("""["line"]""")]
    [InlineData("""{"line":"home"} {}""")]
    public void Refuses_what_JsonSerializer_refuses(string json)
    {
        Assert.ThrowsAny<JsonException>(() => JsonSerializer.Deserialize<Dictionary<string, string?>>(json));
        Assert.ThrowsAny<JsonException>(() => new ClaimJsonReader(IntakeRows.Schema).Read(json, new ClaimJsonReader.Batch()));
    }
}
