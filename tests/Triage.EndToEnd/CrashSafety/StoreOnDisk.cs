using Microsoft.Data.Sqlite;
using Triage.Scoring.Models;

namespace Triage.EndToEnd.CrashSafety;

/// <summary>A registered model version as the registry row records it.</summary>
public sealed record RegistryRow(string Version, string FilePath, string TrainingDataHash, bool IsServing);

/// <summary>Reads a data folder's SQLite store and model files straight from disk, not through the app's code.</summary>
public sealed class StoreOnDisk(string dataFolder)
{
    public string ModelsFolder => Path.Combine(dataFolder, "models");

    /// <summary>SQLite's own consistency check of the whole file: "ok" or the list of what is wrong (sqlite.org/pragma.html#pragma_integrity_check).</summary>
    public string IntegrityCheck() => string.Join("\n", Rows("PRAGMA integrity_check", r => r.GetString(0)));

    /// <summary>Rows a foreign key points away from (sqlite.org/pragma.html#pragma_foreign_key_check); none expected.</summary>
    public int ForeignKeyViolations() => Rows("PRAGMA foreign_key_check", _ => 0).Count;

    public long Scalar(string sql, params (string Name, object Value)[] parameters)
    {
        using var c = Open();
        using var cmd = c.CreateCommand();
        cmd.CommandText = sql;
        foreach (var (name, value) in parameters) cmd.Parameters.AddWithValue(name, value);
        return Convert.ToInt64(cmd.ExecuteScalar());
    }

    public IReadOnlyList<RegistryRow> Registry() =>
        Rows("SELECT Version, FilePath, TrainingDataHash, IsServing FROM ModelVersions ORDER BY Id",
            r => new RegistryRow(r.GetString(0), r.GetString(1), r.GetString(2), r.GetBoolean(3)));

    /// <summary>
    /// Every registered version's file is there and whole: it loads, and it is the model the row describes
    /// (same version name and training-data hash). Returns what is wrong, one line each.
    /// </summary>
    public List<string> RegistryProblems()
    {
        var problems = new List<string>();
        var rows = Registry();
        if (rows.Count(r => r.IsServing) != 1) problems.Add($"{rows.Count(r => r.IsServing)} versions are marked serving.");
        foreach (var row in rows)
        {
            var path = Path.Combine(dataFolder, row.FilePath);
            try
            {
                var m = ScoringModel.Load(path).Metadata;
                if (m.Version != row.Version || m.TrainingDataHash != row.TrainingDataHash)
                    problems.Add($"{row.Version}: the file holds {m.Version} with training-data hash {m.TrainingDataHash}, the registry says {row.TrainingDataHash}.");
            }
            catch (Exception e) when (e is IOException or InvalidDataException or UnauthorizedAccessException)
            {
                problems.Add($"{row.Version}: {path} does not load: {e.Message}");
            }
        }
        return problems;
    }

    public string ServingFile() => Path.Combine(dataFolder, Registry().Single(r => r.IsServing).FilePath);

    private List<T> Rows<T>(string sql, Func<SqliteDataReader, T> read)
    {
        using var c = Open();
        using var cmd = c.CreateCommand();
        cmd.CommandText = sql;
        using var r = cmd.ExecuteReader();
        var rows = new List<T>();
        while (r.Read()) rows.Add(read(r));
        return rows;
    }

    // Not pooled: nothing of the test keeps the file open between checks or after the test.
    private SqliteConnection Open()
    {
        var c = new SqliteConnection(new SqliteConnectionStringBuilder { DataSource = Path.Combine(dataFolder, "triage.db"), Pooling = false }.ToString());
        c.Open();
        return c;
    }
}
