namespace Triage.Cases.Store;

/// <summary>An OS lock on a file: held while the returned stream is open, dropped by the OS when its holder dies.</summary>
internal static class ExclusiveFile
{
    /// <returns>The open, locked file, or null when another holder has it.</returns>
    public static FileStream? TryOpen(string path)
    {
        Directory.CreateDirectory(Path.GetDirectoryName(Path.GetFullPath(path))!);
        try
        {
            // FileShare.None is an exclusive flock on Linux (a share lock on Windows), between processes and between
            // handles of one process alike.
            return new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
        }
        catch (IOException)
        {
            return null;
        }
    }
}
