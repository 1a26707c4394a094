using System.ComponentModel.DataAnnotations;
using Microsoft.Extensions.Options;

namespace Triage.Cases.Options;

public enum StorageProvider { Sqlite, Postgres }

public sealed class StorageOptions
{
    public const string Section = "Storage";
    public string Provider { get; set; } = nameof(StorageProvider.Sqlite);
    /// <summary>Folder for the SQLite file and saved models, relative to the Triage home.</summary>
    [Required] public string DataFolder { get; set; } = "data";
    /// <summary>Required for Postgres; for SQLite it overrides the file under DataFolder when set.</summary>
    public string? ConnectionString { get; set; }
}

public sealed class DemoOptions
{
    public const string Section = "Demo";
    public bool Enabled { get; set; }
    [Required] public string SeedFolder { get; set; } = "seed-cases";
    /// <summary>Password every demo account gets; shown on the sign-in page while the demo is on.</summary>
    public string? Password { get; set; }
}

public sealed class QueueOptions
{
    public const string Section = "Queue";
    /// <summary>Claims scored at or above this probability open a case.</summary>
    [Range(0.0, 1.0)] public double Threshold { get; set; } = 0.2;
    /// <summary>Days an investigator has to close a case once it opens.</summary>
    [Range(1, 365)] public int DueDays { get; set; } = 10;
    /// <summary>
    /// Share of claims below the threshold that open a case anyway, at random (the audit sample), so the
    /// fraud the model misses can be estimated and the next model learns from more than its own picks.
    /// </summary>
    [Range(0.0, 1.0)] public double AuditShare { get; set; } = 0.02;
}

/// <summary>Rules the attributes cannot state; each message names the configuration key.</summary>
internal sealed class StorageOptionsValidator : IValidateOptions<StorageOptions>
{
    public ValidateOptionsResult Validate(string? name, StorageOptions o)
    {
        if (!Enum.TryParse<StorageProvider>(o.Provider, ignoreCase: true, out var provider) || !Enum.IsDefined(provider))
            return ValidateOptionsResult.Fail($"Storage:Provider must be Sqlite or Postgres (got '{o.Provider}').");
        if (provider == StorageProvider.Postgres && string.IsNullOrWhiteSpace(o.ConnectionString))
            return ValidateOptionsResult.Fail("Storage:ConnectionString is required when Storage:Provider is Postgres.");
        return ValidateOptionsResult.Success;
    }
}

internal sealed class DemoOptionsValidator : IValidateOptions<DemoOptions>
{
    public ValidateOptionsResult Validate(string? name, DemoOptions o) =>
        o.Enabled && string.IsNullOrWhiteSpace(o.Password)
            ? ValidateOptionsResult.Fail("Demo:Password is required when Demo:Enabled is true.")
            : ValidateOptionsResult.Success;
}
