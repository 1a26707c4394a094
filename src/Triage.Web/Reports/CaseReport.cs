using System.Globalization;
using PdfSharp.Drawing;
using PdfSharp.Pdf;
using Triage.Cases.CaseFile;
using Triage.Cases.CaseWork;
using Triage.Web.Components.Layout;
using Triage.Web.Components.Pages.Cases;

namespace Triage.Web.Reports;

/// <summary>The case report as a PDF: facts, score, driver chart and list, checks, notes, verdicts and the caution.</summary>
public static class CaseReport
{
    private static readonly XColor Raising = Hex(TriageTheme.Raising);
    private static readonly XColor Lowering = Hex(TriageTheme.Lowering);
    private static readonly XColor Muted = XColor.FromArgb(0x6A, 0x67, 0x88);

    public static byte[] Render(CaseFileView f, DateTime printedAt, string printedBy)
    {
        ReportFonts.Install();
        using var doc = new PdfDocument();
        doc.Info.Title = $"Case report {f.Case.ClaimNumber}";
        using (var page = new ReportPage(doc))
        {
            var c = f.Case;
            page.Text($"Case report · {c.ClaimNumber}", page.Title);
            page.Text($"Printed {CaseFacts.When(printedAt)} by {printedBy}. Larchmere Mutual special investigations.", color: Muted);
            page.Gap(6);
            page.Text(CaseFacts.Caution, page.Bold, color: XColor.FromArgb(0x34, 0x30, 0x7A));

            foreach (var group in CaseFacts.Groups(f))
            {
                page.Section(group.Title);
                foreach (var (name, value) in group.Facts) page.Text($"{name}: {value}");
            }

            page.Section("Risk score");
            page.Text($"{c.Probability * 100:0.0}% probability of fraud (risk score {c.RiskScore}); rank {CaseFacts.Rank(f)}.");
            page.Text($"Scored by model {c.ModelVersion} on {CaseFacts.Date(c.OpenedAt)}.");

            var waterfall = DriverWaterfall.Of(c);
            page.Section("Drivers: from the base rate to this score");
            Chart(page, waterfall);
            foreach (var s in waterfall.Steps)
                page.Text($"{s.Driver.DisplayName} = {s.Driver.ValueText} ({s.Driver.Comparison}): {CaseFacts.Points(s.Driver.EffectPoints)}",
                    color: s.Driver.Raises ? XColor.FromArgb(0x6B, 0x47, 0x04) : Lowering);

            page.Section("Checks");
            foreach (var d in f.Raising)
            {
                page.Text(d.Driver.DisplayName, page.Bold);
                if (d.Checks.Count == 0) page.Text("No playbook entry for this driver.", indent: 12, color: Muted);
                foreach (var k in d.Checks)
                {
                    page.Text((k.IsDone ? "[done] " : "[open] ") + k.Title, indent: 12);
                    if (k.IsDone) page.Text($"Done by {k.DoneBy} on {CaseFacts.When(k.DoneAt!.Value)}" + (k.Note is null ? "" : $": {k.Note}"), indent: 24, color: Muted);
                }
            }

            page.Section("Notes");
            if (c.Notes.Count == 0) page.Text("No notes.", color: Muted);
            foreach (var n in c.Notes.OrderBy(n => n.At)) page.Text($"{CaseFacts.When(n.At)} · {n.By}: {n.Text}");

            page.Section("Verdicts");
            if (c.Verdicts.Count == 0) page.Text("No verdict yet.", color: Muted);
            foreach (var v in c.Verdicts.OrderBy(v => v.At))
            {
                var saved = v.AmountSaved is { } a ? $", amount saved {CaseFacts.Money(a)}" : "";
                page.Text($"{CaseFacts.When(v.At)} · {v.By}: {VerdictReasons.Label(v.Outcome)} — {v.Reason}{saved}" + (v.IsCurrent ? "" : " (superseded)"),
                    v.IsCurrent ? page.Bold : page.Body);
                if (v.Note is not null) page.Text(v.Note, indent: 12, color: Muted);
            }
        }
        using var output = new MemoryStream();
        doc.Save(output, closeStream: false);
        return output.ToArray();
    }

    private static XColor Hex(string rgb) =>
        XColor.FromArgb(Convert.ToInt32(rgb[1..3], 16), Convert.ToInt32(rgb[3..5], 16), Convert.ToInt32(rgb[5..7], 16));

    // The same waterfall as the case page: one bar per driver from the running total before it to after it.
    private static void Chart(ReportPage page, DriverWaterfall w)
    {
        const double row = 13, labelWidth = 150, valueWidth = 48;
        var (low, high) = w.Range();
        var span = Math.Max(high - low, 1);
        var plot = page.Width - labelWidth - valueWidth;
        double X(double points) => ReportPage.Margin + labelWidth + (points - low) / span * plot;
        var small = page.Small;
        var ink = new XSolidBrush(XColors.Black);
        void Marker(string label, double points)
        {
            var (g, top) = page.Reserve(row);
            g.DrawString(label, small, ink, ReportPage.Margin, top + 9);
            g.DrawLine(new XPen(XColor.FromArgb(0x34, 0x30, 0x7A), 1.2), X(points), top + 1, X(points), top + row - 1);
            g.DrawString(points.ToString("0.0", CultureInfo.InvariantCulture) + "%", small, ink, X(points) + 3, top + 9);
        }
        Marker("Base rate", w.BasePoints);
        foreach (var s in w.Steps)
        {
            var (g, top) = page.Reserve(row);
            var name = s.Driver.DisplayName.Length > 32 ? s.Driver.DisplayName[..31] + "…" : s.Driver.DisplayName;
            g.DrawString(name, small, ink, ReportPage.Margin, top + 9);
            var left = X(Math.Min(s.From, s.To));
            g.DrawRectangle(new XSolidBrush(s.Driver.Raises ? Raising : Lowering), left, top + 2, Math.Max(X(Math.Max(s.From, s.To)) - left, 0.8), row - 4);
            g.DrawString(CaseFacts.Points(s.Driver.EffectPoints), small, ink, ReportPage.Margin + labelWidth + plot + 4, top + 9);
        }
        Marker("This case", w.ScorePoints);
        page.Gap(4);
    }
}
