using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.Options;
using Triage.Cases.Options;

namespace Triage.Cases.Hosting;

/// <summary>The configured folders, made absolute against the Triage home.</summary>
public sealed class TriagePaths(IConfiguration configuration, IOptions<StorageOptions> storage, IOptions<DemoOptions> demo)
{
    public string Home { get; } = configuration["Triage:Home"] ?? TriageHome.Locate();
    public string DataFolder => TriageHome.Resolve(Home, storage.Value.DataFolder);
    public string SeedFolder => TriageHome.Resolve(Home, demo.Value.SeedFolder);
    public string ModelsFolder => Path.Combine(DataFolder, "models");
    public string SqliteFile => Path.Combine(DataFolder, "triage.db");
}
