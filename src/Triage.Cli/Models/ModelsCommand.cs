using System.CommandLine;
using System.Globalization;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Models;
using Triage.Cli.Import;
using Triage.Scoring;

namespace Triage.Cli.Models;

/// <summary>
/// <c>triage retrain</c> and <c>triage models list|promote|rollback</c>: the model page's actions over the
/// same services and rules (one retrain at a time, a failure leaves the champion serving, every change audited).
/// </summary>
public static class ModelsCommand
{
    public static Command Retrain(Action<IConfigurationBuilder>? configure = null)
    {
        var trainer = new Option<TrainerKind?>("--trainer") { Description = "FastTree, FastForest or Lbfgs (default: the Scoring section)." };
        var trees = new Option<int?>("--trees") { Description = "Number of trees (FastTree, FastForest)." };
        var leaves = new Option<int?>("--leaves") { Description = "Leaves per tree (FastTree, FastForest)." };
        var holdout = new Option<int?>("--holdout-months") { Description = "Months held out for the comparison." };
        var retrain = new Command("retrain", "Train a challenger on history and verdicts and compare it with the serving model.") { trainer, trees, leaves, holdout };
        retrain.SetAction((parse, ct) => RunAsync(configure, ct, async sp =>
        {
            var service = sp.GetRequiredService<RetrainService>();
            var settings = service.Defaults();
            if (parse.GetValue(trainer) is { } k) settings.Trainer = k;
            if (parse.GetValue(trees) is { } t) (settings.FastTree.NumberOfTrees, settings.FastForest.NumberOfTrees) = (t, t);
            if (parse.GetValue(leaves) is { } l) (settings.FastTree.NumberOfLeaves, settings.FastForest.NumberOfLeaves) = (l, l);
            if (parse.GetValue(holdout) is { } h) settings.HoldoutMonths = h;
            var state = sp.GetRequiredService<RetrainState>();
            var lastStage = "";
            state.Changed += () =>
            {
                if (state.Current is { } run && run.Stage != lastStage) Console.Error.WriteLine($"{(lastStage = run.Stage)} ({run.Fraction:P0})");
            };
            var result = await service.RunAsync(StoreHost.Operator, settings, ct);
            if (result.Outcome != RetrainOutcome.Succeeded)
            {
                Console.Error.WriteLine($"error: {result.Message}");
                return 1;
            }
            var entry = (await sp.GetRequiredService<ModelRegistry>().ListAsync(StoreHost.Operator, ct)).First(e => e.Version.Version == result.Version);
            Console.WriteLine(result.Message);
            if (entry.Comparison is { } c)
            {
                Console.WriteLine($"holdout: {c.HoldoutRows} labelled claims, {c.HoldoutFraud} fraud; k = {c.K} (daily capacity)");
                Console.WriteLine("measure\tchampion\tchallenger");
                Console.WriteLine($"ROC AUC\t{F(c.Champion?.RocAuc)}\t{F(c.Challenger.RocAuc)}");
                Console.WriteLine($"PR AUC\t{F(c.Champion?.PrAuc)}\t{F(c.Challenger.PrAuc)}");
                Console.WriteLine($"precision at {c.K}\t{F(c.Champion?.PrecisionAtK)}\t{F(c.Challenger.PrecisionAtK)}");
                Console.WriteLine($"Brier\t{F(c.Champion?.Brier)}\t{F(c.Challenger.Brier)}");
            }
            return 0;
        }));
        return retrain;
    }

    public static Command Models(Action<IConfigurationBuilder>? configure = null)
    {
        var list = new Command("list", "List model versions: version, status, trainer, trained, holdout ROC AUC, serving since.");
        list.SetAction((parse, ct) => RunAsync(configure, ct, async sp =>
        {
            foreach (var e in await sp.GetRequiredService<ModelRegistry>().ListAsync(StoreHost.Operator, ct))
            {
                var v = e.Version;
                Console.WriteLine($"{v.Version}\t{v.Status}\t{v.Trainer}\t{v.TrainedAt:yyyy-MM-dd HH:mm} by {v.TrainedBy}\tROC AUC {F(v.RocAuc)}" +
                    (v.PromotedAt is { } at ? $"\tserving from {at:yyyy-MM-dd HH:mm} by {v.PromotedBy}: {v.PromotionNote}" : ""));
            }
            return 0;
        }));

        var models = new Command("models", "List, promote and roll back model versions.") { list };
        foreach (var rollBack in new[] { false, true })
        {
            var version = new Argument<string>("version") { Description = "The version, as listed (e.g. v2)." };
            var note = new Option<string>("--note") { Description = "Why (kept with the version and in the audit trail).", Required = true };
            var rescore = new Option<bool>("--rescore") { Description = "Re-score open cases with this model (old drivers are kept in their history)." };
            var command = rollBack
                ? new Command("rollback", "Serve a version that served before again.") { version, note, rescore }
                : new Command("promote", "Make a challenger serve new claims.") { version, note, rescore };
            command.SetAction((parse, ct) => RunAsync(configure, ct, async sp =>
            {
                var registry = sp.GetRequiredService<ModelRegistry>();
                var (v, n, r) = (parse.GetValue(version)!, parse.GetValue(note)!, parse.GetValue(rescore));
                var change = rollBack ? await registry.RollBackAsync(StoreHost.Operator, v, n, r, ct) : await registry.PromoteAsync(StoreHost.Operator, v, n, r, ct);
                Console.WriteLine($"{change.Serving} serves now" + (change.Replaced is null ? "" : $", replacing {change.Replaced}") + (r ? $"; {change.CasesRescored} open cases re-scored." : "."));
                return 0;
            }));
            models.Subcommands.Add(command);
        }
        return models;
    }

    private static string F(double? v) => v is not { } d || double.IsNaN(d) ? "-" : d.ToString("0.000", CultureInfo.InvariantCulture);

    private static async Task<int> RunAsync(Action<IConfigurationBuilder>? configure, CancellationToken ct, Func<IServiceProvider, Task<int>> action)
    {
        try
        {
            using var host = await StoreHost.StartAsync(configure, ct);
            await using var scope = host.Services.CreateAsyncScope();
            return await action(scope.ServiceProvider);
        }
        catch (DomainRuleException e)
        {
            Console.Error.WriteLine($"error: {e.Message}");
            return 1;
        }
    }
}
