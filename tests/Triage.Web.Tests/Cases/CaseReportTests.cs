using Triage.Cases.CaseFile;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Web.Components.Pages.Cases;
using Triage.Web.Reports;
using UglyToad.PdfPig;

namespace Triage.Web.Tests.Cases;

/// <summary>The report is read back with PdfPig 0.1.16, an independent PDF parser, and checked by its words.</summary>
public sealed class CaseReportTests
{
    private static string Words(byte[] pdf)
    {
        using var doc = PdfDocument.Open(pdf);
        return string.Join(" ", doc.GetPages().SelectMany(p => p.GetWords()).Select(w => w.Text));
    }

    private static string Normal(string s) => string.Join(" ", s.Split(' ', StringSplitOptions.RemoveEmptyEntries));

    [Fact]
    public void The_report_holds_facts_score_drivers_checks_notes_verdict_history_and_the_caution()
    {
        var c = CaseSamples.Case();
        var at = CaseSamples.Now;
        c.AssignTo(CaseSamples.Ines, Actor.System, at);
        c.StartReview(CaseSamples.InesActor, at);
        c.CompleteCheck(c.Checks[0].Id, CaseSamples.InesActor, at, "Broker confirms the change");
        c.AddNote("Spoke with the repairer in Wendlow.", CaseSamples.InesActor, at.AddMinutes(5));
        c.RecordVerdict(VerdictOutcome.ConfirmedFraud, "Amount exaggerated", null, 2000, CaseSamples.InesActor, at.AddHours(1));
        c.AmendVerdict(VerdictOutcome.NotFraud, "Facts verified with documents", "Receipts arrived late.", null, CaseSamples.InesActor, at.AddDays(1));

        var text = Words(CaseReport.Render(CaseSamples.View(c, new QueueRank(4, 120)), at.AddDays(2), "ines.varga"));

        string[] expected =
        [
            "Case report · LM-2027-0412", "Line of business: motor", "Cause of loss: collision", "Amount claimed: 8,400.00", "Policy limit: 25,000.00",
            "Assignee: Ines Varga", "Status: Closed", $"{c.Probability * 100:0.0}% probability of fraud",
            "Scored by model fasttree-2027-03-01", "Base rate", "This case",
            "Cover raised before loss = 6 days (much sooner than typical (median 210 days))",
            "Police report = yes (supplied, as in most honest claims): -",
            "[done] Ask why cover was raised", "Done by ines.varga on 15 Mar 2027 09:30 UTC: Broker confirms the change",
            "Prior claims (3 years)", "No playbook entry for this driver.",
            "15 Mar 2027 09:35 UTC · ines.varga: Spoke with the repairer in Wendlow.",
            "Confirmed fraud — Amount exaggerated, amount saved 2,000.00 (superseded)",
            "Not fraud — Facts verified with documents", "Receipts arrived late.",
            Normal(CaseFacts.Caution),
        ];
        foreach (var e in expected) Assert.Contains(Normal(e), text);
    }

    [Fact]
    public void A_case_with_no_work_yet_says_so_and_rank_shows_the_queue_position()
    {
        var text = Words(CaseReport.Render(CaseSamples.View(CaseSamples.Case(), new QueueRank(4, 120)), CaseSamples.Now, "olu.berg"));
        Assert.Contains("rank 4 of 120 open cases", text);
        Assert.Contains("No notes.", text);
        Assert.Contains("No verdict yet.", text);
        Assert.Contains("[open] Ask why cover was raised", text);
    }

    [Fact]
    public void The_driver_chart_draws_one_bar_per_driver_in_its_direction_colour()
    {
        using var doc = PdfDocument.Open(CaseReport.Render(CaseSamples.View(CaseSamples.Case()), CaseSamples.Now, "olu.berg"));
        var steps = DriverWaterfall.Of(CaseSamples.Case()).Steps;
        Assert.Equal(3, steps.Count);
        // Filled rectangles in the content stream: PdfPig exposes paths with their fill colour.
        var fills = doc.GetPage(1).Paths.Where(p => p.IsFilled).Select(p => p.FillColor?.ToRGBValues()).ToList();
        Assert.Equal(2, fills.Count(f => f is { } rgb && Math.Abs(rgb.r - 0xC7 / 255.0) < 0.01 && Math.Abs(rgb.g - 0x85 / 255.0) < 0.01));
        Assert.Equal(1, fills.Count(f => f is { } rgb && Math.Abs(rgb.r - 0x3F / 255.0) < 0.01 && Math.Abs(rgb.g - 0x76 / 255.0) < 0.01));
    }
}
