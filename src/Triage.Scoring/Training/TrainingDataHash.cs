using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using Triage.Scoring.Features;
using Triage.Scoring.Schema;

namespace Triage.Scoring.Training;

/// <summary>
/// SHA-256 of the rows in a canonical text form: in row order, every schema field's trimmed value
/// (schema order, empty when missing), then label and weight, separated by control characters.
/// Fields outside the schema (hidden '_' columns, extra columns) do not change the hash.
/// </summary>
public static class TrainingDataHash
{
    private const int BlockRows = 4_096;

    public static string Compute(ClaimSchema schema, IReadOnlyList<LabelledClaim> rows)
    {
        // Blocks of rows are written out as UTF-8 on several cores and fed to the hash in row order:
        // the same bytes in the same order as writing them one row at a time.
        var blocks = ParallelMap.Ordered(Enumerable.Range(0, (rows.Count + BlockRows - 1) / BlockRows), b =>
        {
            var sb = new StringBuilder();
            for (var r = b * BlockRows; r < Math.Min(rows.Count, (b + 1) * BlockRows); r++)
            {
                var row = rows[r];
                foreach (var f in schema.Fields) sb.Append(ClaimValues.Raw(row.Values, f.Name)).Append('\u001f');
                sb.Append(row.IsFraud ? '1' : '0').Append('\u001f').Append(row.Weight.ToString("R", CultureInfo.InvariantCulture)).Append('\u001e');
            }
            return Encoding.UTF8.GetBytes(sb.ToString());
        });
        using var sha = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        foreach (var block in blocks) sha.AppendData(block);
        return Convert.ToHexStringLower(sha.GetHashAndReset());
    }
}
