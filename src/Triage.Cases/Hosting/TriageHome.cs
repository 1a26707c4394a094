using Microsoft.Extensions.Configuration;

namespace Triage.Cases.Hosting;

/// <summary>
/// The folder that holds appsettings.json and the demo scenario. In a checkout it is the
/// repository root (so the web app and the CLI share one data folder); a published copy
/// carries both files next to its binaries. TRIAGE_HOME overrides the search.
/// </summary>
public static class TriageHome
{
    public static string Locate()
    {
        var fromEnv = Environment.GetEnvironmentVariable("TRIAGE_HOME");
        if (!string.IsNullOrWhiteSpace(fromEnv)) return Path.GetFullPath(fromEnv);
        foreach (var start in new[] { AppContext.BaseDirectory, Directory.GetCurrentDirectory() })
            for (var dir = new DirectoryInfo(start); dir is not null; dir = dir.Parent)
                if (File.Exists(Path.Combine(dir.FullName, "Triage.sln"))) return dir.FullName;
        return AppContext.BaseDirectory;
    }

    /// <summary>Adds the home's appsettings.json (and the environment's override) under env vars and args.</summary>
    public static string AddTriageSettings(this IConfigurationManager configuration, string environmentName)
    {
        var home = Locate();
        var sources = (IList<IConfigurationSource>)((IConfigurationBuilder)configuration).Sources;
        // Insert before environment variables and command line so those still win.
        var firstOverride = sources.TakeWhile(s => s is not Microsoft.Extensions.Configuration.EnvironmentVariables.EnvironmentVariablesConfigurationSource
                                                      and not Microsoft.Extensions.Configuration.CommandLine.CommandLineConfigurationSource).Count();
        // Each source carries its own file provider: a base path set on another builder would not travel with it.
        var files = new Microsoft.Extensions.FileProviders.PhysicalFileProvider(home);
        var extra = new[]
        {
            new Microsoft.Extensions.Configuration.Json.JsonConfigurationSource { FileProvider = files, Path = "appsettings.json", Optional = false },
            new Microsoft.Extensions.Configuration.Json.JsonConfigurationSource { FileProvider = files, Path = $"appsettings.{environmentName}.json", Optional = true },
        };
        foreach (var source in extra.Reverse()) sources.Insert(firstOverride, source);
        configuration["Triage:Home"] = home;
        return home;
    }

    /// <summary>A configured path made absolute against the home folder.</summary>
    public static string Resolve(string home, string path) =>
        Path.IsPathRooted(path) ? path : Path.GetFullPath(Path.Combine(home, path));
}
