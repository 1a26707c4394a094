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
    public static string Compute(ClaimSchema schema, IReadOnlyList<LabelledClaim> rows)
    {
        using var sha = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        var sb = new StringBuilder();
        foreach (var row in rows)
        {
            sb.Clear();
            foreach (var f in schema.Fields) sb.Append(ClaimValues.Raw(row.Values, f.Name)).Append('\u001f');
            sb.Append(row.IsFraud ? '1' : '0').Append('\u001f').Append(row.Weight.ToString("R", CultureInfo.InvariantCulture)).Append('\u001e');
            sha.AppendData(Encoding.UTF8.GetBytes(sb.ToString()));
        }
        return Convert.ToHexStringLower(sha.GetHashAndReset());
    }
}
