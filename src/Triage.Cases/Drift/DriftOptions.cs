using System.ComponentModel.DataAnnotations;

namespace Triage.Cases.Drift;

/// <summary>The "Drift" section: how far back the recent claims reach.</summary>
public sealed class DriftOptions
{
    public const string Section = "Drift";
    /// <summary>Claims reported in the last this many days (today included) are compared with the training data.</summary>
    [Range(1, 3_650)] public int WindowDays { get; set; } = 30;
}
