using System.Diagnostics;
using System.Text;

namespace Triage.EndToEnd.CrashSafety;

/// <summary>The <c>triage</c> command line from its build output, on a given data folder, as an operator runs it.</summary>
public sealed class CliProcess : IDisposable
{
    private readonly StringBuilder _out = new(), _err = new();
    private readonly Process _process;

    private CliProcess(Process process) => _process = process;

    public string Output { get { lock (_out) return _out.ToString(); } }
    public string Errors { get { lock (_err) return _err.ToString(); } }
    public bool HasExited => _process.HasExited;
    public int ExitCode => _process.ExitCode;

    public static CliProcess Start(string dataFolder, IReadOnlyDictionary<string, string> settings, params string[] args)
    {
        var start = new ProcessStartInfo("dotnet", [AppProcess.BuiltDll("Triage.Cli", "triage.dll"), .. args])
        {
            WorkingDirectory = AppProcess.RepoRoot,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        start.Environment["TRIAGE_HOME"] = AppProcess.RepoRoot;
        start.Environment["Storage__DataFolder"] = dataFolder;
        foreach (var (key, value) in settings) start.Environment[key] = value;
        var cli = new CliProcess(Process.Start(start) ?? throw new InvalidOperationException("dotnet did not start."));
        cli._process.OutputDataReceived += (_, e) => Append(cli._out, e.Data);
        cli._process.ErrorDataReceived += (_, e) => Append(cli._err, e.Data);
        cli._process.BeginOutputReadLine();
        cli._process.BeginErrorReadLine();
        return cli;
    }

    /// <summary>Runs to the end; throws with its output when it fails.</summary>
    public static async Task<string> RunAsync(string dataFolder, IReadOnlyDictionary<string, string> settings, params string[] args)
    {
        using var cli = Start(dataFolder, settings, args);
        await cli.WaitAsync();
        return cli.ExitCode == 0 ? cli.Output
            : throw new InvalidOperationException($"triage {string.Join(' ', args)} exited with {cli.ExitCode}:\n{cli.Output}\n{cli.Errors}");
    }

    public Task WaitAsync() => _process.WaitForExitAsync();

    /// <summary>Waits until a line on standard error contains <paramref name="text"/>; false when the process ended first.</summary>
    public async Task<bool> WaitForErrorLineAsync(string text)
    {
        while (!Errors.Contains(text, StringComparison.Ordinal))
        {
            if (_process.HasExited) return Errors.Contains(text, StringComparison.Ordinal);
            await Task.Delay(10);
        }
        return true;
    }

    /// <summary>SIGKILL; returns false when the process had already ended by itself.</summary>
    public async Task<bool> KillAsync()
    {
        if (!_process.HasExited) _process.Kill(entireProcessTree: true);
        await _process.WaitForExitAsync();
        // .NET reports a process ended by a signal as 128 + the signal's number; SIGKILL is 9.
        return _process.ExitCode == 128 + 9;
    }

    private static void Append(StringBuilder to, string? line)
    {
        if (line is null) return;
        lock (to) to.AppendLine(line);
    }

    public void Dispose()
    {
        if (!_process.HasExited) _process.Kill(entireProcessTree: true);
        _process.Dispose();
    }
}
