using System.Net.Http.Headers;
using System.Text;

namespace Triage.EndToEnd.CrashSafety;

/// <summary>
/// New claims for the intake API: the demo's open claims (seed-cases/open-claims.csv) taken in turn under
/// claim numbers that start with <see cref="Prefix"/>, hidden columns left out.
/// </summary>
public sealed class ClaimBatch
{
    private static readonly Lazy<string[]> OpenClaims = new(() => File.ReadAllLines(Path.Combine(AppProcess.RepoRoot, "seed-cases", "open-claims.csv")));

    public string Prefix { get; }
    public int Count { get; }
    public string Csv { get; }
    /// <summary>The first claim's fields as sent (an empty cell is a missing value).</summary>
    public IReadOnlyDictionary<string, string?> First { get; }

    public ClaimBatch(string prefix, int count)
    {
        var lines = OpenClaims.Value;
        Assert.DoesNotContain(lines, l => l.Contains('"')); // plain cells: split on commas
        var header = lines[0].Split(',');
        var keep = Enumerable.Range(0, header.Length).Where(i => !header[i].StartsWith('_')).ToArray();
        var number = Array.IndexOf(header, "claim_number");
        var rows = Enumerable.Range(0, count).Select(i =>
        {
            var cells = lines[1 + i % (lines.Length - 1)].Split(',');
            cells[number] = $"{prefix}{i + 1:D5}";
            return keep.Select(k => cells[k]).ToArray();
        }).ToList();
        Prefix = prefix;
        Count = count;
        Csv = string.Join('\n', [string.Join(',', keep.Select(k => header[k])), .. rows.Select(r => string.Join(',', r))]) + "\n";
        First = keep.Select((k, at) => (header[k], rows[0][at])).ToDictionary(x => x.Item1, x => x.Item2 == "" ? null : x.Item2);
    }

    public Task<HttpResponseMessage> PostAsync(HttpClient http, Uri app, string apiKey, CancellationToken ct = default)
    {
        var request = new HttpRequestMessage(HttpMethod.Post, new Uri(app, "/api/claims"))
        {
            Content = new StringContent(Csv, Encoding.UTF8, new MediaTypeHeaderValue("text/csv")),
        };
        request.Headers.Add("X-Api-Key", apiKey);
        return http.SendAsync(request, ct);
    }

    /// <summary>How many of this batch's claims the store holds, and how many of those have their score row.</summary>
    public (long Claims, long Scored) Stored(StoreOnDisk store) =>
        (store.Scalar("SELECT COUNT(*) FROM Claims WHERE ClaimNumber LIKE $p", ("$p", Prefix + "%")),
         store.Scalar("SELECT COUNT(*) FROM ClaimScores s JOIN Claims c ON c.Id = s.ClaimId WHERE c.ClaimNumber LIKE $p", ("$p", Prefix + "%")));
}
