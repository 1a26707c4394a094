using System.Globalization;
using System.Net;
using System.Text;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Support;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Export;

/// <summary>A shifted intake pushes a field past 0.25: the drift page and the manager's insights page both flag it.</summary>
public sealed class DriftFlagTests(TriageWebFactory factory) : IClassFixture<TriageWebFactory>
{
    [Fact]
    public async Task Fires_on_home_claims_flag_the_cause_of_loss_on_drift_and_insights()
    {
        var olu = SignInClient.Anonymous(factory);
        Assert.Equal(HttpStatusCode.Redirect, (await SignInClient.PostAsync(olu, "olu.berg", TinySeed.Password)).StatusCode);
        Assert.DoesNotContain("data-testid=\"drift-flag\"", await olu.GetStringAsync("/insights"));

        // The tiny seed's home claims are all water damage; 300 fires reported today sit in a bin the training data left empty.
        var today = DateOnly.FromDateTime(DateTime.UtcNow).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
        var rows = IntakeRows.Many(300, "FIRE").Select(r =>
        {
            r["line"] = "home";
            r["loss_cause"] = "fire";
            r["report_date"] = today;
            r["loss_date"] = today;
            r["policy_start_date"] = "2025-01-15";
            r["police_report"] = "";
            r["vehicle_age_years"] = "";
            r["repairer_code"] = "RP-01";
            return r;
        }).ToList();
        var csv = Encoding.UTF8.GetBytes(IntakeRows.Csv(rows));
        using (var scope = factory.Services.CreateScope())
        {
            var admin = new Actor("admin", "admin", new HashSet<string> { Roles.Admin });
            var report = await scope.ServiceProvider.GetRequiredService<ClaimIntake>()
                .ImportAsync(new ImportSource("fires.csv", ImportFormat.Csv, () => new MemoryStream(csv)), admin);
            Assert.False(report.Rejected, report.Summary);
        }

        var drift = await olu.GetStringAsync("/models/drift");
        Assert.Contains("data-testid=\"drift-flags\"", drift);
        Assert.Contains("Cause of loss (", drift);
        var insights = await olu.GetStringAsync("/insights");
        Assert.Contains("data-testid=\"drift-flag\"", insights);
        Assert.Contains("Cause of loss", insights);
    }
}
