using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;
using Triage.Scoring.Tests.Support;
using Triage.Scoring.Training;

namespace Triage.Scoring.Tests.Training;

public class ScoringSetupTests
{
    private static IHost Build(Dictionary<string, string?> settings)
    {
        var builder = Host.CreateEmptyApplicationBuilder(new());
        builder.Configuration.AddJsonFile(Path.Combine(Repo.Root, "appsettings.json"));
        builder.Configuration.AddInMemoryCollection(settings);
        builder.AddTriageScoring();
        return builder.Build();
    }

    [Fact]
    public void Binds_the_scoring_section_of_appsettings()
    {
        using var host = Build([]);
        var o = host.Services.GetRequiredService<IOptions<ScoringOptions>>().Value;
        Assert.Equal((TrainerKind.FastTree, 7, 6, 100, 10, 20, 0.1), (o.Trainer, o.Seed, o.HoldoutMonths, o.FastTree.NumberOfTrees, o.FastTree.NumberOfLeaves, o.FastTree.MinimumExampleCountPerLeaf, o.FastTree.LearningRate));
        Assert.Equal((200, 0.01f, 0.1f), (o.FastForest.NumberOfTrees, o.Lbfgs.L1Regularization, o.Lbfgs.L2Regularization));
        Assert.NotNull(host.Services.GetRequiredService<ModelTrainer>());
    }

    [Theory]
    [InlineData("Scoring:HoldoutMonths", "0", "HoldoutMonths")]
    [InlineData("Scoring:FastTree:NumberOfLeaves", "1", "Scoring:FastTree")]
    [InlineData("Scoring:Lbfgs:L2Regularization", "-1", "Scoring:Lbfgs")]
    public async Task Bad_settings_stop_the_start_naming_the_setting(string key, string value, string named)
    {
        using var host = Build(new() { [key] = value });
        var e = await Assert.ThrowsAsync<OptionsValidationException>(() => host.StartAsync());
        Assert.Contains(named, e.Message);
    }
}
