using System.CommandLine;

// One sub-command per feature folder; each folder exposes a static Create().
var root = new RootCommand("Triage: claims fraud triage from the command line.");
root.Subcommands.Add(Triage.Cli.Demo.DemoCommand.Create());
root.Subcommands.Add(Triage.Cli.Explain.ExplainCommand.Create());
root.Subcommands.Add(Triage.Cli.Users.UsersCommand.Create());
root.Subcommands.Add(Triage.Cli.Import.ImportCommand.Create());
root.Subcommands.Add(Triage.Cli.ApiKeys.ApiKeysCommand.Create());
foreach (var c in Triage.Cli.Backup.BackupCommand.Create()) root.Subcommands.Add(c);
root.Subcommands.Add(Triage.Cli.Export.ExportCommand.Create());
root.Subcommands.Add(Triage.Cli.Models.ModelsCommand.Retrain());
root.Subcommands.Add(Triage.Cli.Models.ModelsCommand.Models());

return await root.Parse(args).InvokeAsync();
