using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Web.Account;

namespace Triage.Web.Reports;

public static class ReportEndpoints
{
    public static string PathFor(int caseId) => $"/cases/{caseId}/report.pdf";

    /// <summary>GET /cases/{id}/report.pdf: signed-in users who may read the case; the service writes the audit event.</summary>
    public static void MapReportEndpoints(this IEndpointRouteBuilder app) =>
        app.MapGet("/cases/{id:int}/report.pdf", async (int id, HttpContext http, CaseWorkService work, TimeProvider clock, CancellationToken ct) =>
        {
            var actor = http.User.ToActor();
            try
            {
                var file = await work.ReportAsync(id, actor, ct);
                var pdf = CaseReport.Render(file, clock.GetUtcNow().UtcDateTime, actor.UserName);
                return Results.File(pdf, "application/pdf", $"case-{file.Case.ClaimNumber}.pdf");
            }
            catch (CaseNotFoundException e) { return Results.Problem(e.Message, statusCode: StatusCodes.Status404NotFound); }
            catch (AccessDeniedException e) { return Results.Problem(e.Message, statusCode: StatusCodes.Status403Forbidden); }
        });
}
