using System.Diagnostics;
using System.Net;
using System.Net.Sockets;
using System.Reflection;
using System.Text;

namespace Triage.EndToEnd;

/// <summary>
/// The web app started as a user starts it: <c>dotnet Triage.Web.dll</c> from its build output, with the
/// repository as its home, a fresh data folder and a free port. First start trains on the full demo.
/// </summary>
public sealed class AppProcess : IAsyncLifetime
{
    private static readonly TimeSpan StartTimeout = TimeSpan.FromMinutes(3);
    private readonly StringBuilder _log = new();
    private Process? _process;

    public static string RepoRoot { get; } = FindRepoRoot();
    public string DataFolder { get; } = Path.Combine(Path.GetTempPath(), "triage-e2e", Guid.NewGuid().ToString("N"));
    public Uri BaseUrl { get; private set; } = default!;
    public string Log { get { lock (_log) return _log.ToString(); } }

    public async Task InitializeAsync()
    {
        var dll = WebDll();
        BaseUrl = new Uri($"http://127.0.0.1:{FreePort()}");
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

    public async Task DisposeAsync()
    {
        if (_process is { HasExited: false })
        {
            _process.Kill(entireProcessTree: true);
            await _process.WaitForExitAsync();
        }
        _process?.Dispose();
        try { Directory.Delete(DataFolder, recursive: true); } catch (IOException) { /* a file still open */ }
    }

    // The same configuration as this test build (Debug or Release).
    private static string WebDll()
    {
        var configuration = typeof(AppProcess).Assembly.GetCustomAttribute<AssemblyConfigurationAttribute>()?.Configuration ?? "Debug";
        var dll = Path.Combine(RepoRoot, "src", "Triage.Web", "bin", configuration, "net10.0", "Triage.Web.dll");
        return File.Exists(dll) ? dll : throw new FileNotFoundException($"Build the web app first: {dll} is missing.", dll);
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
