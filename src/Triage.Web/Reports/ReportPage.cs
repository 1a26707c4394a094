using PdfSharp.Drawing;
using PdfSharp.Pdf;

namespace Triage.Web.Reports;

/// <summary>A top-to-bottom writer over A4 pages: wraps text to the width and starts a new page when one fills up.</summary>
internal sealed class ReportPage(PdfDocument doc) : IDisposable
{
    public const double Margin = 50;
    private XGraphics? _g;
    private double _y;

    // Instance fields, so no font is made before the caller has installed the font resolver.
    public XFont Body { get; } = new(ReportFonts.Family, 9.5, XFontStyleEx.Regular);
    public XFont Bold { get; } = new(ReportFonts.Family, 9.5, XFontStyleEx.Bold);
    public XFont Small { get; } = new(ReportFonts.Family, 7.5, XFontStyleEx.Regular);
    public XFont Heading { get; } = new(ReportFonts.Family, 12.5, XFontStyleEx.Bold);
    public XFont Title { get; } = new(ReportFonts.Family, 17, XFontStyleEx.Bold);

    public double Width => PageWidth - 2 * Margin;
    private static double PageWidth => XUnit.FromMillimeter(210).Point;
    private static double PageHeight => XUnit.FromMillimeter(297).Point;

    /// <summary>Space for <paramref name="height"/> points, on a new page if this one is full; returns the top of it.</summary>
    public (XGraphics G, double Top) Reserve(double height)
    {
        if (_g is null || _y + height > PageHeight - Margin)
        {
            _g?.Dispose();
            var page = doc.AddPage();
            page.Width = XUnit.FromPoint(PageWidth);
            page.Height = XUnit.FromPoint(PageHeight);
            _g = XGraphics.FromPdfPage(page);
            _y = Margin;
        }
        var top = _y;
        _y += height;
        return (_g, top);
    }

    public void Gap(double points) => _y += points;

    public void Text(string text, XFont? font = null, double indent = 0, XColor? color = null)
    {
        font ??= Body;
        var brush = new XSolidBrush(color ?? XColors.Black);
        var lineHeight = font.Size * 1.35;
        foreach (var line in Wrap(text, font, Width - indent))
        {
            var (g, top) = Reserve(lineHeight);
            g.DrawString(line, font, brush, Margin + indent, top + font.Size);
        }
    }

    public void Section(string title)
    {
        Gap(8);
        Text(title, Heading, color: XColor.FromArgb(0x34, 0x30, 0x7A));
        Gap(2);
    }

    private IEnumerable<string> Wrap(string text, XFont font, double width)
    {
        var (g, _) = Reserve(0);
        foreach (var paragraph in text.Split('\n'))
        {
            var line = "";
            foreach (var word in paragraph.Split(' ', StringSplitOptions.RemoveEmptyEntries))
            {
                var candidate = line.Length == 0 ? word : $"{line} {word}";
                if (line.Length > 0 && g.MeasureString(candidate, font).Width > width)
                {
                    yield return line;
                    line = word;
                }
                else line = candidate;
            }
            yield return line;
        }
    }

    public void Dispose() => _g?.Dispose();
}
