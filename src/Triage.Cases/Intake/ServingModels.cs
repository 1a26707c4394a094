using System.Collections.Concurrent;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Store;
using Triage.Scoring.Models;

namespace Triage.Cases.Intake;

/// <summary>
/// The model that scores arriving claims, loaded once per version and shared (models are thread-safe). Which
/// version serves is read from the store on every call, so every instance sharing the store switches with
/// the registry's transaction; a model is used only once its whole file is loaded.
/// </summary>
public sealed class ServingModels(TriagePaths paths)
{
    private readonly ConcurrentDictionary<string, Lazy<ScoringModel>> _loaded = new();
    private volatile string? _version;

    /// <summary>The serving version this instance last loaded, or null before the first load (or when none serves).</summary>
    public string? Version => _version;

    public async Task<(ModelVersion Version, ScoringModel Model)> CurrentAsync(TriageDbContext db, CancellationToken ct)
    {
        var serving = await db.ModelVersions.AsNoTracking().SingleOrDefaultAsync(m => m.IsServing, ct)
            ?? throw new IntakeUnavailableException("No model is serving, so arriving claims cannot be scored; train and promote a model first.");
        try
        {
            var model = Load(serving);
            _version = serving.Version;
            return (serving, model);
        }
        catch (Exception e) when (e is IOException or InvalidDataException)
        {
            throw new IntakeUnavailableException($"The serving model {serving.Version} cannot be read from '{Path.Combine(paths.DataFolder, serving.FilePath)}': {e.Message}");
        }
    }

    /// <summary>Loads the serving version if it is not loaded yet; returns it, or null when no model serves.</summary>
    public async Task<string?> RefreshAsync(TriageDbContext db, CancellationToken ct)
    {
        var serving = await db.ModelVersions.AsNoTracking().SingleOrDefaultAsync(m => m.IsServing, ct);
        if (serving is not null) Load(serving);
        _version = serving?.Version;
        return _version;
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
