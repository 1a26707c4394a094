using System.ComponentModel.DataAnnotations;

namespace Triage.Cases.Intake;

public sealed class IntakeOptions
{
    public const string Section = "Intake";
    /// <summary>Row errors listed in a report; the count of all of them is always given.</summary>
    [Range(1, 10_000)] public int MaxErrors { get; set; } = 200;
    /// <summary>Longest value accepted in any field, in characters.</summary>
    [Range(16, 100_000)] public int MaxFieldLength { get; set; } = 500;
    /// <summary>Rows stored per SaveChanges inside the one import transaction.</summary>
    [Range(100, 50_000)] public int BatchSize { get; set; } = 2_000;
    /// <summary>Largest HTTP body POST /api/claims accepts.</summary>
    [Range(1_024, 1_073_741_824)] public long MaxBodyBytes { get; set; } = 20 * 1024 * 1024;
    /// <summary>Most claims one HTTP request may carry.</summary>
    [Range(1, 1_000_000)] public int MaxRowsPerRequest { get; set; } = 20_000;
    /// <summary>Largest file the upload page accepts.</summary>
    [Range(1_024, 4_294_967_296)] public long MaxUploadBytes { get; set; } = 200L * 1024 * 1024;
}
