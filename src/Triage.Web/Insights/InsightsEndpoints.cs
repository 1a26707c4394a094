using System.Globalization;
using System.Text;
using Triage.Cases.Domain;
using Triage.Cases.Insights;
using Triage.Web.Account;

namespace Triage.Web.Insights;

public static class InsightsEndpoints
{
    public static readonly string[] Tables = ["drivers", "investigators", "months", "calibration", "audit-sample", "queue-age"];

    /// <summary>The CSV address of a table with the page's filters, e.g. /insights/drivers.csv?line=motor.</summary>
    public static string PathFor(string table, InsightFilter f)
    {
        var query = new List<string>();
        if (f.From is { } from) query.Add($"from={from:yyyy-MM-dd}");
        if (f.To is { } to) query.Add($"to={to:yyyy-MM-dd}");
        if (f.Line is { } line) query.Add($"line={Uri.EscapeDataString(line)}");
        if (f.ModelVersion is { } model) query.Add($"model={Uri.EscapeDataString(model)}");
        return $"/insights/{table}.csv" + (query.Count == 0 ? "" : "?" + string.Join('&', query));
    }

    /// <summary>GET /insights/{table}.csv?from=&amp;to=&amp;line=&amp;model=: the page's tables for managers and admins (the service checks).</summary>
    public static void MapInsightsEndpoints(this IEndpointRouteBuilder app) =>
        app.MapGet("/insights/{table}.csv", async (string table, string? from, string? to, string? line, string? model,
            HttpContext http, InsightsService insights, CancellationToken ct) =>
        {
            if (!Tables.Contains(table))
                return Results.Problem($"There is no insight table '{table}'; use one of {string.Join(", ", Tables)}.", statusCode: StatusCodes.Status404NotFound);
            if (!TryDate(from, out var fromDay)) return BadDate("from", from);
            if (!TryDate(to, out var toDay)) return BadDate("to", to);
            var filter = new InsightFilter(fromDay, toDay, Blank(line), Blank(model));
            var actor = http.User.ToActor();
            try
            {
                var text = new StringWriter(CultureInfo.InvariantCulture);
                switch (table)
                {
                    case "drivers": InsightsCsv.HitRates(text, await insights.ByDriverAsync(actor, filter, ct), "driver"); break;
                    case "investigators": InsightsCsv.HitRates(text, await insights.ByInvestigatorAsync(actor, filter, ct), "investigator"); break;
                    case "months": InsightsCsv.Months(text, await insights.ByMonthAsync(actor, filter, ct)); break;
                    case "calibration": InsightsCsv.Calibration(text, await insights.CalibrationAsync(actor, filter, ct)); break;
                    case "audit-sample": InsightsCsv.AuditSample(text, await insights.AuditSampleAsync(actor, filter, ct)); break;
                    default: InsightsCsv.QueueAge(text, await insights.QueueAgeAsync(actor, filter.Line, ct)); break;
                }
                return Results.File(Encoding.UTF8.GetBytes(text.ToString()), "text/csv", $"{table}.csv");
            }
            catch (AccessDeniedException e) { return Results.Problem(e.Message, statusCode: StatusCodes.Status403Forbidden); }
        });

    private static IResult BadDate(string name, string? raw) =>
        Results.Problem($"Query value '{name}' must be a date as yyyy-MM-dd (got '{raw}').", statusCode: StatusCodes.Status400BadRequest);

    private static string? Blank(string? s) => string.IsNullOrWhiteSpace(s) ? null : s.Trim();

    private static bool TryDate(string? raw, out DateOnly? day)
    {
        day = null;
        if (Blank(raw) is not { } v) return true;
        if (!DateOnly.TryParseExact(v, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var d)) return false;
        day = d;
        return true;
    }
}
