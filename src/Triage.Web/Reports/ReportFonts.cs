using PdfSharp.Fonts;

namespace Triage.Web.Reports;

/// <summary>Serves DejaVu Sans from the assembly: PDFsharp uses no system fonts on Linux.</summary>
public sealed class ReportFonts : IFontResolver
{
    public const string Family = "DejaVu Sans";
    private static readonly Lock Gate = new();

    /// <summary>Installs the resolver once per process; PDFsharp refuses a second one after first use.</summary>
    public static void Install()
    {
        lock (Gate)
        {
            if (GlobalFontSettings.FontResolver is not ReportFonts) GlobalFontSettings.FontResolver = new ReportFonts();
        }
    }

    public FontResolverInfo? ResolveTypeface(string familyName, bool bold, bool italic) =>
        new(bold ? "DejaVuSans-Bold" : "DejaVuSans");

    public byte[]? GetFont(string faceName)
    {
        using var stream = typeof(ReportFonts).Assembly.GetManifestResourceStream($"Triage.Fonts.{faceName}.ttf")
            ?? throw new InvalidOperationException($"The font {faceName}.ttf is not embedded in {typeof(ReportFonts).Assembly.GetName().Name}.");
        using var copy = new MemoryStream();
        stream.CopyTo(copy);
        return copy.ToArray();
    }
}
