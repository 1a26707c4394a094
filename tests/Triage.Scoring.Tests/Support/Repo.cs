namespace Triage.Scoring.Tests.Support;

public static class Repo
{
    /// <summary>The folder holding Triage.sln, found by walking up from the test's base directory.</summary>
    public static string Root { get; } = FindRoot();

    public static string SeedCases(string file) => Path.Combine(Root, "seed-cases", file);

    private static string FindRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "Triage.sln"))) return dir.FullName;
        throw new DirectoryNotFoundException($"No Triage.sln above {AppContext.BaseDirectory}.");
    }
}
