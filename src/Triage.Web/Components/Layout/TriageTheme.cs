using MudBlazor;

namespace Triage.Web.Components.Layout;

/// <summary>Our palette: a deep indigo frame, amber for what raises risk, slate teal for what lowers it.</summary>
public static class TriageTheme
{
    public const string Raising = "#C7850F";
    public const string Lowering = "#3F7673";

    public static readonly MudTheme Theme = new()
    {
        PaletteLight = new PaletteLight
        {
            Primary = "#34307A",
            Secondary = Lowering,
            Tertiary = "#5A4FB0",
            Warning = Raising,
            Info = "#4B6B9A",
            AppbarBackground = "#1F1B4E",
            AppbarText = "#F4F2FF",
            DrawerBackground = "#F1F0F8",
            DrawerText = "#24214A",
            DrawerIcon = "#34307A",
            Background = "#FAFAFD",
            TextPrimary = "#1E1C33",
        },
        Typography = new Typography
        {
            Default = new DefaultTypography { FontFamily = ["Inter", "Segoe UI", "Helvetica", "Arial", "sans-serif"] },
        },
        LayoutProperties = new LayoutProperties { DefaultBorderRadius = "6px" },
    };
}
