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
        var path = Path.Combine(paths.DataFolder, serving.FilePath);
        // PublicationOnly: a failed load is not cached, so a restored file is picked up on the next call.
        var model = _loaded.GetOrAdd(path, p => new Lazy<ScoringModel>(() => ScoringModel.Load(p), LazyThreadSafetyMode.PublicationOnly));
        try
        {
            return (serving, model.Value);
        }
        catch (Exception e) when (e is IOException or InvalidDataException)
        {
            throw new IntakeUnavailableException($"The serving model {serving.Version} cannot be read from '{path}': {e.Message}");
        }
    }
}

/// <summary>Intake cannot run at all right now (no serving model); the input itself may be fine.</summary>
public sealed class IntakeUnavailableException(string message) : Exception(message);
