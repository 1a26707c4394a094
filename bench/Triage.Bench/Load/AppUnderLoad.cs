using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using System.Reflection;

namespace Triage.Bench.Load;

/// <summary>The web app from its Release build output as a child process on a free loopback port, over a fresh data folder.</summary>
internal sealed class AppUnderLoad : IAsyncDisposable
{
    private readonly Process _process;

    public Uri BaseUrl { get; }
    public string DataFolder { get; }
    public string RepoRoot { get; }
    public int ProcessId => _process.Id;

    private AppUnderLoad(Process process, Uri baseUrl, string dataFolder, string repoRoot) =>
        (_process, BaseUrl, DataFolder, RepoRoot) = (process, baseUrl, dataFolder, repoRoot);

    public static async Task<AppUnderLoad> StartAsync(IReadOnlyDictionary<string, string> settings)
    {
        var root = RepoRootFrom(AppContext.BaseDirectory);
        var configuration = typeof(AppUnderLoad).Assembly.GetCustomAttribute<AssemblyConfigurationAttribute>()?.Configuration ?? "Release";
        var dll = Path.Combine(root, "src", "Triage.Web", "bin", configuration, "net10.0", "Triage.Web.dll");
        if (!File.Exists(dll)) throw new FileNotFoundException($"Build the web app first: {dll} is missing.", dll);
        var data = Directory.CreateTempSubdirectory("triage-load-").FullName;
        var url = new Uri($"http://127.0.0.1:{FreePort()}");
        var start = new ProcessStartInfo("dotnet", [dll])
        {
            WorkingDirectory = Path.GetDirectoryName(dll)!,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.Environment["TRIAGE_HOME"] = root;
        start.Environment["Storage__DataFolder"] = data;
        start.Environment["Urls"] = url.ToString().TrimEnd('/');
        start.Environment["Logging__LogLevel__Default"] = "Warning";
        foreach (var (k, v) in settings) start.Environment[k] = v;
        var process = Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start.");
        // At Warning level the console logger writes only what went wrong: show it beside the figures.
        DataReceivedEventHandler show = (_, e) => { if (e.Data is { Length: > 0 } line) Console.Error.WriteLine($"  app: {line}"); };
        process.OutputDataReceived += show;
        process.ErrorDataReceived += show;
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
        var app = new AppUnderLoad(process, url, data, root);
        await app.WaitUntilAnsweringAsync();
        return app;
    }

    /// <summary>Resident memory of the app process from /proc (Linux), in bytes.</summary>
    public long ResidentBytes()
    {
        foreach (var line in File.ReadLines($"/proc/{_process.Id}/status"))
            if (line.StartsWith("VmRSS:", StringComparison.Ordinal))
                return long.Parse(line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1]) * 1024;
        throw new InvalidOperationException("VmRSS not found.");
    }

    private async Task WaitUntilAnsweringAsync()
    {
        using var http = new HttpClient { Timeout = TimeSpan.FromSeconds(5) };
        var watch = Stopwatch.StartNew();
        while (watch.Elapsed < TimeSpan.FromMinutes(3))
        {
            if (_process.HasExited) throw new InvalidOperationException($"The app exited with code {_process.ExitCode}.");
            try
            {
                if ((await http.GetAsync(new Uri(BaseUrl, "/signin"))).StatusCode == HttpStatusCode.OK) return;
            }
            catch (HttpRequestException) { /* not listening yet */ }
            catch (TaskCanceledException) { /* first start still training */ }
            await Task.Delay(500);
        }
        throw new TimeoutException($"The app did not answer on {BaseUrl} within 3 minutes.");
    }

    public async ValueTask DisposeAsync()
    {
        if (!_process.HasExited)
        {
            _process.Kill(entireProcessTree: true);
            await _process.WaitForExitAsync();
        }
        _process.Dispose();
        try { Directory.Delete(DataFolder, recursive: true); } catch (IOException) { /* a file still open */ }
    }

    private static int FreePort()
    {
        using var listener = new TcpListener(IPAddress.Loopback, 0);
        listener.Start();
        return ((IPEndPoint)listener.LocalEndpoint).Port;
    }

    private static string RepoRootFrom(string start)
    {
        for (var dir = new DirectoryInfo(start); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "Triage.sln"))) return dir.FullName;
        throw new DirectoryNotFoundException($"No Triage.sln above {start}.");
    }
}
