using System.Security.Cryptography;
using System.Text;
using Triage.Cases.Hosting;

namespace Triage.Cases.Export;

/// <summary>
/// Stable pseudonyms for identifiers in exports: HMAC-SHA256 keyed with a secret kept in the data folder
/// (export-pseudonym.key, 32 random bytes, created on first use, readable by its owner only). The field
/// name is hashed with the value, so one value in two fields gives two pseudonyms; the same value in the
/// same field gives the same pseudonym in every export for as long as the key file is kept.
/// </summary>
public sealed class Pseudonyms(TriagePaths paths)
{
    public const string KeyFileName = "export-pseudonym.key";
    private const int KeyBytes = 32, PseudonymBytes = 12;
    private readonly Lazy<byte[]> _key = new(() => LoadOrCreate(Path.Combine(paths.DataFolder, KeyFileName)));

    /// <summary>"ps-" and 24 hex digits (the first 96 bits of the HMAC).</summary>
    public string Of(string field, string value)
    {
        var mac = HMACSHA256.HashData(_key.Value, Encoding.UTF8.GetBytes($"{field}\n{value}"));
        return "ps-" + Convert.ToHexStringLower(mac.AsSpan(0, PseudonymBytes));
    }

    private static byte[] LoadOrCreate(string path)
    {
        if (!File.Exists(path))
        {
            Directory.CreateDirectory(Path.GetDirectoryName(path)!);
            var key = RandomNumberGenerator.GetBytes(KeyBytes);
            var temp = $"{path}.{Guid.NewGuid():N}.tmp";
            var options = new FileStreamOptions { Mode = FileMode.CreateNew, Access = FileAccess.Write };
            if (!OperatingSystem.IsWindows()) options.UnixCreateMode = UnixFileMode.UserRead | UnixFileMode.UserWrite;
            using (var file = new FileStream(temp, options))
                file.Write(Encoding.ASCII.GetBytes(Convert.ToBase64String(key)));
            try
            {
                // A rename that never overwrites: when two exports start at once, one key wins and both use it.
                File.Move(temp, path, overwrite: false);
                return key;
            }
            catch (IOException) when (File.Exists(path)) { File.Delete(temp); }
        }
        var text = File.ReadAllText(path).Trim();
        try
        {
            var key = Convert.FromBase64String(text);
            return key.Length == KeyBytes ? key : throw new FormatException($"it holds {key.Length} bytes, not {KeyBytes}");
        }
        catch (FormatException e)
        {
            throw new InvalidDataException($"The pseudonym key '{path}' is damaged ({e.Message}); restore it from a backup, or delete it to start new pseudonyms that will not match earlier exports.", e);
        }
    }
}
