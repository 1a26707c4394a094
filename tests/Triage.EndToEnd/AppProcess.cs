using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using System.Reflection;
using System.Text;

namespace Triage.EndToEnd;

/// <summary>
/// The web app started as a user starts it: <c>dotnet Triage.Web.dll</c> from its build output, with the
/// repository as its home, a fresh data folder and a free port. First start trains on the full demo.
/// <see cref="On"/> starts it on a given data folder with extra settings; it can be killed and started again there.
/// </summary>
public sealed class AppProcess : IAsyncLifetime
{
    private static readonly TimeSpan StartTimeout = TimeSpan.FromMinutes(3);
    private readonly StringBuilder _log = new();
    private readonly IReadOnlyDictionary<string, string> _settings;
    private readonly bool _ownsDataFolder;
    private Process? _process;

    public AppProcess() : this(Path.Combine(Path.GetTempPath(), "triage-e2e", Guid.NewGuid().ToString("N")), new Dictionary<string, string>(), true) { }

    private AppProcess(string dataFolder, IReadOnlyDictionary<string, string> settings, bool ownsDataFolder)
    {
        DataFolder = dataFolder;
        _settings = settings;
        _ownsDataFolder = ownsDataFolder;
        BaseUrl = new Uri($"http://127.0.0.1:{FreePort()}");
    }

    /// <summary>Not started yet; the caller owns the data folder. <paramref name="settings"/> are environment variables (<c>Demo__SeedFolder</c>, ...).</summary>
    public static AppProcess On(string dataFolder, IReadOnlyDictionary<string, string>? settings = null) =>
        new(dataFolder, settings ?? new Dictionary<string, string>(), false);

    public static string RepoRoot { get; } = FindRepoRoot();
    public string DataFolder { get; }
    public Uri BaseUrl { get; }
    public string Log { get { lock (_log) return _log.ToString(); } }

    public Task InitializeAsync() => StartAsync();

    /// <summary>Starts the app (again, after <see cref="KillAsync"/>) and waits until it answers the sign-in page.</summary>
    public async Task StartAsync()
    {
        if (_process is { HasExited: false }) throw new InvalidOperationException("The app is running already.");
        _process?.Dispose();
        var dll = WebDll();
        var start = new ProcessStartInfo("dotnet", [dll])
        {
            WorkingDirectory = Path.GetDirectoryName(dll)!,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.Environment["TRIAGE_HOME"] = RepoRoot;
        start.Environment["Storage__DataFolder"] = DataFolder;
        start.Environment["Urls"] = BaseUrl.ToString().TrimEnd('/');
        // Static web assets are served from the build output only in Development (see the stack notes).
        start.Environment["ASPNETCORE_ENVIRONMENT"] = "Development";
        foreach (var (key, value) in _settings) start.Environment[key] = value;
        _process = Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start.");
        _process.OutputDataReceived += (_, e) => Append(e.Data);
        _process.ErrorDataReceived += (_, e) => Append(e.Data);
        _process.BeginOutputReadLine();
        _process.BeginErrorReadLine();
        await WaitUntilAnsweringAsync();
    }

    private void Append(string? line)
    {
        if (line is null) return;
        lock (_log) _log.AppendLine(line);
    }

    private async Task WaitUntilAnsweringAsync()
    {
        using var http = new HttpClient { Timeout = TimeSpan.FromSeconds(5) };
        var deadline = Stopwatch.StartNew();
        while (deadline.Elapsed < StartTimeout)
        {
            if (_process!.HasExited) throw new InvalidOperationException($"The app exited with code {_process.ExitCode}:\n{Log}");
            try
            {
                if ((await http.GetAsync(new Uri(BaseUrl, "/signin"))).StatusCode == HttpStatusCode.OK) return;
            }
            catch (HttpRequestException) { /* not listening yet */ }
            catch (TaskCanceledException) { /* busy training */ }
            await Task.Delay(500);
        }
        throw new TimeoutException($"The app did not answer on {BaseUrl} within {StartTimeout.TotalSeconds:0} s:\n{Log}");
    }

    /// <summary>SIGKILL, as a crash or a power cut looks to the process: no shutdown code runs.</summary>
    public async Task KillAsync()
    {
        if (_process is not { HasExited: false }) return;
        _process.Kill(entireProcessTree: true);
        await _process.WaitForExitAsync();
    }

    public async Task DisposeAsync()
    {
        await KillAsync();
        _process?.Dispose();
        if (!_ownsDataFolder) return;
        try { Directory.Delete(DataFolder, recursive: true); } catch (IOException) { /* a file still open */ }
    }

    private static string WebDll() => BuiltDll("Triage.Web", "Triage.Web.dll");

    /// <summary>A project's build output in the same configuration as this test build (Debug or Release).</summary>
    public static string BuiltDll(string project, string file)
    {
        var configuration = typeof(AppProcess).Assembly.GetCustomAttribute<AssemblyConfigurationAttribute>()?.Configuration ?? "Debug";
        var dll = Path.Combine(RepoRoot, "src", project, "bin", configuration, "net10.0", file);
        return File.Exists(dll) ? dll : throw new FileNotFoundException($"Build {project} first: {dll} is missing.", dll);
    }

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    private static string FindRepoRoot()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "Triage.sln"))) return dir.FullName;
        throw new DirectoryNotFoundException($"No Triage.sln above {AppContext.BaseDirectory}.");
    }
}
