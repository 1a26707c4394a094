using System.Collections.Concurrent;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Store;
using Triage.Scoring.Models;

namespace Triage.Cases.Intake;

/// <summary>The model that scores arriving claims, loaded once per version and shared (models are thread-safe).</summary>
public sealed class ServingModels(TriagePaths paths)
{
    private readonly ConcurrentDictionary<string, Lazy<ScoringModel>> _loaded = new();

    public async Task<(ModelVersion Version, ScoringModel Model)> CurrentAsync(TriageDbContext db, CancellationToken ct)
    {
        var serving = await db.ModelVersions.AsNoTracking().SingleOrDefaultAsync(m => m.IsServing, ct)
            ?? throw new IntakeUnavailableException("No model is serving, so arriving claims cannot be scored; train and promote a model first.");
        try
        {
            return (serving, Load(serving));
        }
        catch (Exception e) when (e is IOException or InvalidDataException)
        {
            throw new IntakeUnavailableException($"The serving model {serving.Version} cannot be read from '{Path.Combine(paths.DataFolder, serving.FilePath)}': {e.Message}");
        }
    }

    /// <summary>
    /// Loads a version's file (once; later calls share it). Promotion calls this before switching, so the
    /// first request after the switch finds the whole model already in memory.
    /// </summary>
    public ScoringModel Load(ModelVersion version)
    {
        var path = Path.Combine(paths.DataFolder, version.FilePath);
        // PublicationOnly: a failed load is not cached, so a restored file is picked up on the next call.
        return _loaded.GetOrAdd(path, p => new Lazy<ScoringModel>(() => ScoringModel.Load(p), LazyThreadSafetyMode.PublicationOnly)).Value;
    }
}

/// <summary>Intake cannot run at all right now (no serving model); the input itself may be fine.</summary>
public sealed class IntakeUnavailableException(string message) : Exception(message);
