using System.Text;
using Triage.Cases.Intake;

namespace Triage.Cases.Tests.Intake;

/// <param name="Row">The data row the error must name (0 = the header or the whole file).</param>
/// <param name="Column">The column the error must name, or null when the problem is not in one cell.</param>
/// <param name="Fragment">Words the message must contain, so the sender learns what is wrong.</param>
public sealed record MalformedInput(byte[] Body, int Row, string? Column, string Fragment,
    ImportFormat Format = ImportFormat.Csv, char Delimiter = ',', int? MaxRows = null);

/// <summary>Inputs intake must refuse, each with the row, column and words of the error it must give.</summary>
public static class MalformedCorpus
{
    private const string Bad = "Bad";

    public static IEnumerable<object[]> Names => Inputs.Keys.Select(k => new object[] { k });

    public static readonly IReadOnlyDictionary<string, MalformedInput> Inputs = Build();

    private static Dictionary<string, MalformedInput> Build()
    {
        var csv = IntakeRows.Csv(IntakeRows.Many(3, Bad));
        var header = string.Join(',', IntakeRows.Header);
        var d = new Dictionary<string, MalformedInput>
        {
            // File and header
            ["empty file"] = new([], 0, null, "empty"),
            ["empty file with BOM"] = new([0xEF, 0xBB, 0xBF], 0, null, "empty"),
            ["header only"] = new(U(header + "\n"), 0, null, "no claims"),
            ["whitespace only"] = new(U("   \n"), 0, null, "header row is required"),
            ["semicolon file read as comma"] = new(U(IntakeRows.Csv(IntakeRows.Many(2, Bad), ';')), 0, null, "';' as delimiter"),
            ["tab file read as comma"] = new(U(IntakeRows.Csv(IntakeRows.Many(2, Bad), '\t')), 0, null, "'\\t' as delimiter"),
            ["comma file read as semicolon"] = new(U(csv), 0, null, "',' as delimiter", Delimiter: ';'),
            ["no header row"] = new(U(string.Join('\n', csv.Split('\n').Skip(1))), 0, null, "header row is required"),
            ["missing column"] = new(U(IntakeRows.Csv(IntakeRows.Many(2, Bad), header: [.. IntakeRows.Header.Where(h => h != "loss_cause")])), 0, "loss_cause", "missing"),
            ["missing optional column"] = new(U(IntakeRows.Csv(IntakeRows.Many(2, Bad), header: [.. IntakeRows.Header.Where(h => h != "loss_hour")])), 0, "loss_hour", "missing"),
            ["extra column"] = new(U(IntakeRows.Csv(IntakeRows.Many(2, Bad), header: [.. IntakeRows.Header, "colour"])), 0, "colour", "no such column"),
            ["misspelt column"] = new(U(csv.Replace("claimed_amount", "claimed_amout")), 0, "claimed_amout", "no such column"),
            ["column twice"] = new(U(IntakeRows.Csv(IntakeRows.Many(2, Bad), header: [.. IntakeRows.Header, "line"])), 0, "line", "more than once"),
            ["row with a field too few"] = new(U(DropLastField(csv, 2)), 2, null, "header has 19"),
            ["row with a field too many"] = new(U(AddField(csv, 3)), 3, null, "header has 19"),
            ["unbalanced quote"] = new(U(csv.Replace("Intake Person 2", "Intake \"Person 2")), 2, null, "malformed"),
            ["unclosed quote to end of file"] = new(U(csv.Replace("Intake Person 2", "\"Intake Person 2") + new string('x', 3_000_000)), 2, null, "malformed"),
            ["invalid UTF-8 byte"] = new(Bytes(csv, "Intake Person 2", [0x49, 0xFF, 0x6E]), 2, "claimant_name", "not UTF-8"),
            ["Latin-1 accent"] = new(Bytes(csv, "Intake Person 3", [0x52, 0xE9, 0x6E, 0xE9, 0x65]), 3, "claimant_name", "not UTF-8"),
            ["UTF-16 text without BOM"] = new(Encoding.Unicode.GetBytes(csv), 0, null, "looks like UTF-16"),
            ["huge field"] = new(U(IntakeRows.Edit(csv, 2, "claimant_name", new string('z', 20_000))), 2, "claimant_name", "characters long"),
            ["too many rows"] = new(U(IntakeRows.Csv(IntakeRows.Many(6, Bad))), 6, null, "more than 5 claims", MaxRows: 5),
            ["comma decimal in semicolon file"] = new(U(IntakeRows.Edit(IntakeRows.Csv(IntakeRows.Many(2, Bad), ';'), 1, "claimed_amount", "1200,50", ';')), 1, "claimed_amount", "not a number", Delimiter: ';'),
            // Numbers
            ["amount not a number"] = new(U(IntakeRows.Edit(csv, 1, "claimed_amount", "abc")), 1, "claimed_amount", "not a number"),
            ["negative amount"] = new(U(IntakeRows.Edit(csv, 2, "claimed_amount", "-5")), 2, "claimed_amount", "below the smallest allowed value 0"),
            ["amount with thousands separator"] = new(U(IntakeRows.Edit(csv, 1, "claimed_amount", "\"1,200.50\"")), 1, "claimed_amount", "not a number"),
            ["amount above range"] = new(U(IntakeRows.Edit(csv, 3, "claimed_amount", "600000")), 3, "claimed_amount", "above the largest allowed value 500000"),
            ["amount missing"] = new(U(IntakeRows.Edit(csv, 1, "claimed_amount", "")), 1, "claimed_amount", "required"),
            ["amount NaN"] = new(U(IntakeRows.Edit(csv, 1, "claimed_amount", "NaN")), 1, "claimed_amount", "not a number"),
            ["amount infinite"] = new(U(IntakeRows.Edit(csv, 1, "claimed_amount", "Infinity")), 1, "claimed_amount", "not a number"),
            ["amount with currency"] = new(U(IntakeRows.Edit(csv, 2, "claimed_amount", "EUR 300")), 2, "claimed_amount", "not a number"),
            ["loss hour 24"] = new(U(IntakeRows.Edit(csv, 2, "loss_hour", "24")), 2, "loss_hour", "above the largest allowed value 23"),
            ["negative prior claims"] = new(U(IntakeRows.Edit(csv, 1, "prior_claims_3y", "-1")), 1, "prior_claims_3y", "below"),
            ["policy limit too small"] = new(U(IntakeRows.Edit(csv, 3, "policy_limit", "50")), 3, "policy_limit", "below the smallest allowed value 100"),
            ["vehicle age text"] = new(U(IntakeRows.Edit(csv, 1, "vehicle_age_years", "old")), 1, "vehicle_age_years", "not a number"),
            // Dates
            ["month 13"] = new(U(IntakeRows.Edit(csv, 1, "loss_date", "2027-13-01")), 1, "loss_date", "yyyy-MM-dd"),
            ["day-first date"] = new(U(IntakeRows.Edit(csv, 2, "loss_date", "01/03/2027")), 2, "loss_date", "yyyy-MM-dd"),
            ["report date missing"] = new(U(IntakeRows.Edit(csv, 3, "report_date", "")), 3, "report_date", "required"),
            ["30 February"] = new(U(IntakeRows.Edit(csv, 1, "report_date", "2027-02-30")), 1, "report_date", "yyyy-MM-dd"),
            ["policy start as a word"] = new(U(IntakeRows.Edit(csv, 2, "policy_start_date", "tomorrow")), 2, "policy_start_date", "yyyy-MM-dd"),
            ["loss after report"] = new(U(IntakeRows.Edit(IntakeRows.Edit(csv, 2, "loss_date", "2027-03-20"), 2, "report_date", "2027-03-12")), 2, "loss_date", "after the report date"),
            ["policy starts after loss"] = new(U(IntakeRows.Edit(csv, 1, "policy_start_date", "2027-03-25")), 1, "policy_start_date", "policy starts after the loss date"),
            // Categories and yes/no
            ["unknown line"] = new(U(IntakeRows.Edit(csv, 1, "line", "boat")), 1, "line", "not an allowed value"),
            ["line in other case"] = new(U(IntakeRows.Edit(csv, 2, "line", "Motor")), 2, "line", "not an allowed value"),
            ["unknown loss cause"] = new(U(IntakeRows.Edit(csv, 3, "loss_cause", "flood")), 3, "loss_cause", "not an allowed value"),
            ["unknown branch"] = new(U(IntakeRows.Edit(csv, 1, "branch_office", "Nowhere")), 1, "branch_office", "not an allowed value"),
            ["unknown repairer"] = new(U(IntakeRows.Edit(csv, 1, "repairer_code", "RP-99")), 1, "repairer_code", "not an allowed value"),
            ["unknown age band"] = new(U(IntakeRows.Edit(csv, 2, "claimant_age_band", "17-")), 2, "claimant_age_band", "not an allowed value"),
            ["police report maybe"] = new(U(IntakeRows.Edit(csv, 1, "police_report", "maybe")), 1, "police_report", "'yes' or 'no'"),
            ["police report as 1"] = new(U(IntakeRows.Edit(csv, 3, "police_report", "1")), 3, "police_report", "'yes' or 'no'"),
            // Identity of the claim
            ["claim number missing"] = new(U(IntakeRows.Edit(csv, 2, "claim_number", "")), 2, "claim_number", "required"),
            ["claim number too long"] = new(U(IntakeRows.Edit(csv, 1, "claim_number", new string('C', 65))), 1, "claim_number", "at most 64"),
            ["policy number missing"] = new(U(IntakeRows.Edit(csv, 3, "policy_number", "")), 3, "policy_number", "required"),
            ["duplicate claim number in file"] = new(U(IntakeRows.Edit(csv, 3, "claim_number", "Bad-000001")), 3, "claim_number", "also on row 1"),
            ["claim number stored with other content"] = new(U(IntakeRows.Edit(csv, 2, "claim_number", "O-00001")), 2, "claim_number", "already stored with different content"),
            ["error on row 250 of 250"] = new(U(IntakeRows.Edit(IntakeRows.Csv(IntakeRows.Many(250, Bad)), 250, "line", "ship")), 250, "line", "not an allowed value"),
            // JSON
            ["JSON object, not array"] = new(U("{\"claim_number\":\"X\"}"), 1, null, "not a valid JSON array", ImportFormat.Json),
            ["JSON cut short"] = new(U(IntakeRows.Json(IntakeRows.Many(2, Bad))[..200]), 1, null, "not a valid JSON array", ImportFormat.Json),
            ["JSON element a number"] = new(U("[42]"), 1, null, "not an object", ImportFormat.Json),
            ["JSON unknown property"] = new(U(IntakeRows.Json(IntakeRows.Many(2, Bad)).Replace("\"line\"", "\"lane\"")), 1, "lane", "no such field", ImportFormat.Json),
            ["JSON nested value"] = new(U(IntakeRows.Json(IntakeRows.Many(1, Bad)).Replace("\"Dunmere\"", "{\"name\":\"Dunmere\"}")), 1, "branch_office", "must be a string", ImportFormat.Json),
            ["JSON amount text"] = new(U(IntakeRows.Json(IntakeRows.Many(2, Bad)).Replace("\"25000\"", "\"lots\"")), 1, "policy_limit", "not a number", ImportFormat.Json),
            ["JSON empty array"] = new(U("[]"), 0, null, "no claims", ImportFormat.Json),
            ["JSON invalid UTF-8"] = new(Bytes(IntakeRows.Json(IntakeRows.Many(2, Bad)), "Intake Person 1", [0x49, 0xFF]), 1, "claimant_name", "not UTF-8", ImportFormat.Json),
        };
        return d;
    }

    private static byte[] U(string s) => Encoding.UTF8.GetBytes(s);

    private static string DropLastField(string csv, int row)
    {
        var lines = csv.Split('\n');
        lines[row] = lines[row][..lines[row].LastIndexOf(',')];
        return string.Join('\n', lines);
    }

    private static string AddField(string csv, int row)
    {
        var lines = csv.Split('\n');
        lines[row] += ",surplus";
        return string.Join('\n', lines);
    }

    /// <summary>The UTF-8 of the text with one piece replaced by raw bytes (which need not be UTF-8).</summary>
    private static byte[] Bytes(string text, string replace, byte[] with)
    {
        var at = text.IndexOf(replace, StringComparison.Ordinal);
        return [.. U(text[..at]), .. with, .. U(text[(at + replace.Length)..])];
    }
}
