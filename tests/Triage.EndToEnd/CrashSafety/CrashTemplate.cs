namespace Triage.EndToEnd.CrashSafety;

/// <summary>
/// One first start shared by the crash tests: a small demo scenario (fewer claims than the shipped one, so the
/// first start and each retrain are quick), the app started once on it, and an intake API key. Each test
/// works on its own copy of the data folder.
/// </summary>
public sealed class CrashTemplate : IAsyncLifetime
{
    private readonly string _root = Path.Combine(Path.GetTempPath(), "triage-crash", Guid.NewGuid().ToString("N"));
    private readonly List<string> _copies = [];

    private string TemplateFolder => Path.Combine(_root, "template");
    public IReadOnlyDictionary<string, string> Settings { get; private set; } = new Dictionary<string, string>();
    public string ApiKey { get; private set; } = "";

    public async Task InitializeAsync()
    {
        var seed = Path.Combine(_root, "seed");
        await CliProcess.RunAsync(TemplateFolder, Settings, "demo", "generate", "--seed", "7", "--history-rows", "6000", "--open-rows", "300", "--out", seed);
        Settings = new Dictionary<string, string> { ["Demo__SeedFolder"] = seed };
        await using (var app = AppProcess.On(TemplateFolder, Settings))
            await app.StartAsync();
        ApiKey = (await CliProcess.RunAsync(TemplateFolder, Settings, "api-keys", "create", "--name", "crash tests")).Trim();
    }

    /// <summary>A fresh data folder holding a copy of the first-started store and its model files.</summary>
    public string NewDataFolder()
    {
        var to = Path.Combine(_root, $"run-{_copies.Count + 1}");
        Copy(new DirectoryInfo(TemplateFolder), to);
        _copies.Add(to);
        return to;
    }

    private static void Copy(DirectoryInfo from, string to)
    {
        Directory.CreateDirectory(to);
        foreach (var f in from.GetFiles()) f.CopyTo(Path.Combine(to, f.Name));
        foreach (var d in from.GetDirectories()) Copy(d, Path.Combine(to, d.Name));
    }

    public Task DisposeAsync()
    {
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        try { Directory.Delete(_root, recursive: true); } catch (IOException) { /* a file still open */ }
        return Task.CompletedTask;
    }
}
