using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Triage.Scoring.Training;

namespace Triage.Scoring;

public static class ScoringSetup
{
    /// <summary>Binds and validates the "Scoring" section (on start) and registers <see cref="ModelTrainer"/>.</summary>
    public static IHostApplicationBuilder AddTriageScoring(this IHostApplicationBuilder builder)
    {
        builder.Services.AddOptions<ScoringOptions>()
            .BindConfiguration(ScoringOptions.Section)
            .ValidateDataAnnotations()
            .ValidateOnStart();
        builder.Services.AddSingleton<ModelTrainer>();
        return builder;
    }
}
