using System.ComponentModel.DataAnnotations;

namespace Triage.Cases.Instances;

/// <summary>How instances sharing one PostgreSQL store keep each other up to date.</summary>
public sealed class InstanceOptions
{
    public const string Section = "Instances";

    /// <summary>
    /// Seconds between checks of which model the registry says serves, a safety net for a missed
    /// "model promoted" notice (the notice itself switches within moments).
    /// </summary>
    [Range(1, 3600)] public int ModelCheckSeconds { get; set; } = 30;

    /// <summary>Longest wait between attempts to reconnect the notice listener (it starts at one second and doubles).</summary>
    [Range(1, 600)] public int ReconnectMaxSeconds { get; set; } = 30;
}
