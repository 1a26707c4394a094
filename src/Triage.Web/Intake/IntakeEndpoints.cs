using Microsoft.AspNetCore.Http.Features;
using Microsoft.Extensions.Options;
using Microsoft.Net.Http.Headers;
using Triage.Cases.ApiKeys;
using Triage.Cases.Intake;

namespace Triage.Web.Intake;

/// <summary>
/// POST /api/claims: a CSV or JSON batch from another system, authenticated by an API key. Success is
/// 200 with the counts; every refusal is an RFC 9457 problem document, with the row errors listed.
/// </summary>
public static class IntakeEndpoints
{
    public const string Route = "/api/claims";
    public const string KeyHeader = "X-Api-Key";

    public static void MapIntakeEndpoints(this IEndpointRouteBuilder app) =>
        // No cookie and no antiforgery token: the API key is the caller's credential.
        app.MapPost(Route, PostAsync).AllowAnonymous().DisableAntiforgery();

    private static async Task<IResult> PostAsync(HttpContext http, ApiKeyService keys, ClaimIntake intake, IOptions<IntakeOptions> options, CancellationToken ct)
    {
        var o = options.Value;
        var secret = http.Request.Headers[KeyHeader].FirstOrDefault() ?? Bearer(http.Request.Headers.Authorization.FirstOrDefault());
        if (string.IsNullOrWhiteSpace(secret))
            return Unauthorized(http, "api-key-required", "API key required", $"Send an intake API key in the {KeyHeader} header (or as Authorization: Bearer <key>).");
        var key = await keys.AuthenticateAsync(secret, ApiKey.IntakeScope, ct);
        if (key is null)
            return Unauthorized(http, "api-key-refused", "API key refused", "The key is unknown, was revoked, or is not an intake key. Ask an administrator for a new one.");

        if (Format(http.Request.ContentType) is not { } format)
            return Problem(StatusCodes.Status415UnsupportedMediaType, "unsupported-media-type", "Unsupported body type",
                $"Send the claims as text/csv or application/json (got '{http.Request.ContentType ?? "no Content-Type"}').");
        if (Delimiter(http.Request.Query["delimiter"].FirstOrDefault()) is not { } delimiter)
            return Problem(StatusCodes.Status400BadRequest, "bad-delimiter", "Bad delimiter", "delimiter must be one character, or 'tab' (for example ?delimiter=%3B for ';').");
        if (http.Request.ContentLength > o.MaxBodyBytes) return TooLarge(o);

        var sizeLimit = http.Features.Get<IHttpMaxRequestBodySizeFeature>();
        if (sizeLimit is { IsReadOnly: false }) sizeLimit.MaxRequestBodySize = o.MaxBodyBytes + 1;
        var spool = Path.Combine(Path.GetTempPath(), $"triage-intake-{Guid.NewGuid():N}.tmp");
        try
        {
            // Kept in a temp file: intake reads the body twice (check, then store) and memory stays flat.
            if (!await SpoolAsync(http.Request.Body, spool, o.MaxBodyBytes, ct)) return TooLarge(o);
            var source = new ImportSource("request body", format, () => File.OpenRead(spool), delimiter, o.MaxRowsPerRequest);
            var report = await intake.ImportAsync(source, key.AsActor(), ct: ct);
            if (!report.Rejected)
                return Results.Ok(new { report.Rows, report.Stored, report.Duplicates, report.Queued, report.ScoredOnly, report.Summary });
            var status = report.OverRowLimit ? StatusCodes.Status413PayloadTooLarge : StatusCodes.Status422UnprocessableEntity;
            return Problem(status, status == 413 ? "too-many-rows" : "invalid-claims", "Claims rejected; nothing was stored", report.Summary, new()
            {
                ["rows"] = report.Rows,
                ["errorCount"] = report.ErrorCount,
                ["errors"] = report.Errors.Select(e => new { e.Row, e.Column, e.Value, e.Problem }).ToList(),
            });
        }
        catch (IntakeUnavailableException e)
        {
            return Problem(StatusCodes.Status503ServiceUnavailable, "intake-unavailable", "Intake unavailable", e.Message);
        }
        catch (BadHttpRequestException e) when (e.StatusCode == StatusCodes.Status413PayloadTooLarge)
        {
            return TooLarge(o);
        }
        finally
        {
            File.Delete(spool);
        }
    }

    private static async Task<bool> SpoolAsync(Stream body, string path, long max, CancellationToken ct)
    {
        await using var file = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16, useAsync: true);
        var buffer = new byte[1 << 16];
        long total = 0;
        int read;
        while ((read = await body.ReadAsync(buffer, ct)) > 0)
        {
            total += read;
            if (total > max) return false;
            await file.WriteAsync(buffer.AsMemory(0, read), ct);
        }
        return true;
    }

    private static string? Bearer(string? authorization) =>
        authorization is not null && authorization.StartsWith("Bearer ", StringComparison.OrdinalIgnoreCase) ? authorization[7..].Trim() : null;

    private static ImportFormat? Format(string? contentType)
    {
        if (!MediaTypeHeaderValue.TryParse(contentType, out var media)) return null;
        var type = media.MediaType.Value?.ToLowerInvariant();
        return type switch
        {
            "text/csv" or "application/csv" => ImportFormat.Csv,
            "application/json" => ImportFormat.Json,
            _ => null,
        };
    }

    private static char? Delimiter(string? value) => value switch
    {
        null or "" => ',',
        "tab" or "\\t" => '\t',
        { Length: 1 } when value[0] is not ('"' or '\r' or '\n') && char.IsAscii(value[0]) => value[0],
        _ => null,
    };

    private static IResult TooLarge(IntakeOptions o) =>
        Problem(StatusCodes.Status413PayloadTooLarge, "body-too-large", "Body too large",
            $"A request may carry at most {o.MaxBodyBytes:N0} bytes and {o.MaxRowsPerRequest:N0} claims; split the batch.");

    private static IResult Unauthorized(HttpContext http, string slug, string title, string detail)
    {
        http.Response.Headers.WWWAuthenticate = $"ApiKey header=\"{KeyHeader}\", Bearer";
        return Problem(StatusCodes.Status401Unauthorized, slug, title, detail);
    }

    private static IResult Problem(int status, string slug, string title, string detail, Dictionary<string, object?>? extensions = null) =>
        Results.Problem(detail, Route, status, title, $"urn:triage:problem:{slug}", extensions);
}
