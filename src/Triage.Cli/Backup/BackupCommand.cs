using System.CommandLine;
using Microsoft.Extensions.Configuration;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Backup;
using Triage.Cases.Domain;
using Triage.Cli.Import;
using Triage.Cli.Users;

namespace Triage.Cli.Backup;

/// <summary><c>triage backup &lt;file&gt;</c> and <c>triage restore &lt;file&gt; --overwrite</c>: safe while the app is serving.</summary>
public static class BackupCommand
{
    public static IEnumerable<Command> Create(Action<IConfigurationBuilder>? configure = null)
    {
        var target = new Argument<FileInfo>("file") { Description = "Archive to write (a zip with the database, the model files and a manifest)." };
        var backup = new Command("backup", "Copy the store and its model files into one archive while the app keeps running.") { target };
        backup.SetAction((parse, ct) => RunAsync(configure, async b =>
        {
            var m = await b.BackupAsync(parse.GetValue(target)!.FullName, StoreHost.Operator, ct);
            Console.WriteLine($"Backed up {m.Claims} claims, {m.Cases} cases and {m.ModelFiles.Count} model file(s) (migration {m.LastMigration}) to {parse.GetValue(target)!.FullName}.");
        }, ct));

        var source = new Argument<FileInfo>("file") { Description = "Archive written by 'triage backup'." };
        var overwrite = new Option<bool>("--overwrite") { Description = "Confirm that the store's current contents are replaced by the archive's." };
        var restore = new Command("restore", "Replace the store with a backup, after checking the whole archive.") { source, overwrite };
        restore.SetAction((parse, ct) =>
        {
            if (!parse.GetValue(overwrite))
            {
                Console.Error.WriteLine("error: restore replaces every claim, case and model in the store; add --overwrite to confirm.");
                return Task.FromResult(2);
            }
            return RunAsync(configure, async b =>
            {
                var m = await b.RestoreAsync(parse.GetValue(source)!.FullName, StoreHost.Operator, ct);
                Console.WriteLine($"Restored {m.Claims} claims, {m.Cases} cases and {m.ModelFiles.Count} model file(s) from the backup taken {m.CreatedAt:yyyy-MM-dd HH:mm} UTC.");
            }, ct);
        });
        return [backup, restore];
    }

    private static async Task<int> RunAsync(Action<IConfigurationBuilder>? configure, Func<StoreBackup, Task> work, CancellationToken ct)
    {
        try
        {
            var overrides = new ConfigurationBuilder();
            configure?.Invoke(overrides);
            // Migrated only, never seeded: restoring onto an empty folder must not first train a demo model.
            using var host = await CliStore.OpenAsync(overrides.Build().AsEnumerable().ToDictionary(p => p.Key, p => p.Value), ct);
            await using var scope = host.Services.CreateAsyncScope();
            await work(scope.ServiceProvider.GetRequiredService<StoreBackup>());
            return 0;
        }
        catch (Exception e) when (e is BackupRefusedException or IOException or AccessDeniedException)
        {
            Console.Error.WriteLine($"error: {e.Message}");
            return 1;
        }
    }
}
