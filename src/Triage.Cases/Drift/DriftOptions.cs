using System.ComponentModel.DataAnnotations;

namespace Triage.Cases.Drift;

/// <summary>The "Drift" section: how far back the recent claims reach.</summary>
public sealed class DriftOptions
{
    public const string Section = "Drift";
    /// <summary>Claims reported in the last this many days (today included) are compared with the training data.</summary>
    [Range(1, 3_650)] public int WindowDays { get; set; } = 30;
    /// <summary>
    /// Below this many recent claims nothing is flagged: PSI from n claims over k bins carries noise of about
    /// (k − 1) / n even with no drift at all (the chi-square approximation), so a small window cries wolf.
    /// </summary>
    [Range(1, 1_000_000)] public int MinimumClaims { get; set; } = 200;
}
