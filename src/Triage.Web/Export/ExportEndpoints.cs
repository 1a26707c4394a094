using System.Globalization;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Web.Account;

namespace Triage.Web.Export;

public static class ExportEndpoints
{
    /// <summary>The download address for a filter, e.g. /export/outcomes.csv?line=motor&amp;pseudonymise=true.</summary>
    public static string PathFor(ExportFormat format, ExportFilter f)
    {
        var query = new List<string>();
        if (f.From is { } from) query.Add($"from={from:yyyy-MM-dd}");
        if (f.To is { } to) query.Add($"to={to:yyyy-MM-dd}");
        if (f.Line is { } line) query.Add($"line={Uri.EscapeDataString(line)}");
        if (f.ModelVersion is { } model) query.Add($"model={Uri.EscapeDataString(model)}");
        if (f.IncludeInconclusive) query.Add("inconclusive=true");
        if (f.Pseudonymise) query.Add("pseudonymise=true");
        return $"/export/outcomes.{Extension(format)}" + (query.Count == 0 ? "" : "?" + string.Join('&', query));
    }

    public static string Extension(ExportFormat format) => format == ExportFormat.Csv ? "csv" : "parquet";

    /// <summary>
    /// GET /export/outcomes.{csv|parquet}?from=&amp;to=&amp;line=&amp;model=&amp;inconclusive=&amp;pseudonymise=: the rows stream
    /// to the response; the service checks the role and audits the export.
    /// </summary>
    public static void MapExportEndpoints(this IEndpointRouteBuilder app) =>
        app.MapGet("/export/outcomes.{format}", async (string format, string? from, string? to, string? line, string? model,
            string? inconclusive, string? pseudonymise, HttpContext http, OutcomeExportService exports, TimeProvider clock, CancellationToken ct) =>
        {
            ExportFormat? kind = format switch { "csv" => ExportFormat.Csv, "parquet" => ExportFormat.Parquet, _ => null };
            if (kind is null)
                return Results.Problem($"Outcomes export as '{format}' is not offered; use outcomes.csv or outcomes.parquet.", statusCode: StatusCodes.Status404NotFound);
            if (!TryDate(from, out var fromDay)) return Bad($"Query value 'from' must be a date as yyyy-MM-dd (got '{from}').");
            if (!TryDate(to, out var toDay)) return Bad($"Query value 'to' must be a date as yyyy-MM-dd (got '{to}').");
            if (!TryFlag(inconclusive, out var withInconclusive)) return Bad($"Query value 'inconclusive' must be true or false (got '{inconclusive}').");
            if (!TryFlag(pseudonymise, out var pseudonymised)) return Bad($"Query value 'pseudonymise' must be true or false (got '{pseudonymise}').");
            var filter = new ExportFilter(fromDay, toDay, Blank(line), Blank(model), withInconclusive, pseudonymised);
            OutcomeExportService.PreparedExport export;
            try { export = await exports.PrepareAsync(http.User.ToActor(), filter, ct); }
            catch (AccessDeniedException e) { return Results.Problem(e.Message, statusCode: StatusCodes.Status403Forbidden); }
            catch (InvalidDataException e) { return Results.Problem(e.Message, statusCode: StatusCodes.Status409Conflict); }
            var name = $"outcomes-{clock.GetUtcNow():yyyyMMdd-HHmm}.{Extension(kind.Value)}";
            var type = kind == ExportFormat.Csv ? "text/csv" : "application/vnd.apache.parquet";
            return Results.Stream(body => export.WriteAsync(kind.Value, body, ct), type, name);
        });

    private static IResult Bad(string message) => Results.Problem(message, statusCode: StatusCodes.Status400BadRequest);

    private static string? Blank(string? s) => string.IsNullOrWhiteSpace(s) ? null : s.Trim();

    private static bool TryFlag(string? raw, out bool value)
    {
        value = false;
        if (Blank(raw) is not { } v) return true;
        return bool.TryParse(v, out value);
    }

    private static bool TryDate(string? raw, out DateOnly? day)
    {
        day = null;
        if (Blank(raw) is not { } v) return true;
        if (!DateOnly.TryParseExact(v, "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var d)) return false;
        day = d;
        return true;
    }
}
