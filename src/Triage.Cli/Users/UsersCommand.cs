using System.CommandLine;
using Microsoft.Extensions.DependencyInjection;
using Spectre.Console;
using Triage.Cases.Accounts;
using Triage.Cases.Domain;

namespace Triage.Cli.Users;

/// <summary><c>triage users add|list|roles</c>: accounts for a store where the demo accounts are off.</summary>
public static class UsersCommand
{
    /// <param name="input">Where <c>--password-stdin</c> reads from (the console unless a test says otherwise).</param>
    /// <param name="settings">Configuration laid over appsettings.json and the environment (tests point it at a temp store).</param>
    public static Command Create(TextReader? input = null, IReadOnlyDictionary<string, string?>? settings = null)
    {
        var overrides = settings ?? new Dictionary<string, string?>();
        var command = new Command("users", "Create accounts, list them and change their roles.");
        command.Subcommands.Add(Add(input ?? Console.In, overrides));
        command.Subcommands.Add(List(overrides));
        command.Subcommands.Add(SetRoles(overrides));
        return command;
    }

    private static Command Add(TextReader input, IReadOnlyDictionary<string, string?> overrides)
    {
        var userName = new Argument<string>("userName") { Description = "The name the person signs in with." };
        var name = new Option<string>("--name") { Description = "Display name, e.g. \"Ines Varga\".", Required = true };
        var email = new Option<string>("--email") { Description = "E-mail address (unique).", Required = true };
        var roles = new Option<string>("--roles") { Description = $"Comma-separated: {string.Join(", ", Roles.All)}.", Required = true };
        var lines = new Option<string>("--lines") { Description = "Lines of business worked, comma-separated (e.g. motor,home).", DefaultValueFactory = _ => "" };
        var capacity = new Option<int>("--capacity") { Description = "Cases the person can take on in a day.", DefaultValueFactory = _ => 0 };
        var stdin = new Option<bool>("--password-stdin") { Description = "Read the password from the first line of standard input instead of prompting." };
        var add = new Command("add", "Create an account.") { userName, name, email, roles, lines, capacity, stdin };
        add.SetAction((parse, ct) => RunAsync(overrides, async services =>
        {
            var password = parse.GetValue(stdin) ? input.ReadLine() : Prompt(parse.GetValue(userName)!);
            if (string.IsNullOrEmpty(password)) throw new DomainRuleException("No password given.");
            var account = new NewAccount(parse.GetValue(userName)!, parse.GetValue(name)!, parse.GetValue(email)!,
                Split(parse.GetValue(roles)), Split(parse.GetValue(lines)), parse.GetValue(capacity));
            var user = await services.GetRequiredService<UserAccounts>().AddAsync(Actor.System, account, password, ct);
            Console.WriteLine($"Created {user.UserName} ({user.DisplayName}) with roles {string.Join(", ", account.Roles)}.");
        }, ct));
        return add;
    }

    private static Command List(IReadOnlyDictionary<string, string?> overrides)
    {
        var list = new Command("list", "List every account with its roles and lines.");
        list.SetAction((_, ct) => RunAsync(overrides, async services =>
        {
            var table = new Table().AddColumns("User name", "Name", "Roles", "Lines");
            foreach (var a in await services.GetRequiredService<TeamDirectory>().ListAsync(ct))
                table.AddRow(Markup.Escape(a.UserName), Markup.Escape(a.DisplayName), string.Join(", ", a.Roles), string.Join(", ", a.Lines));
            AnsiConsole.Write(table);
        }, ct));
        return list;
    }

    private static Command SetRoles(IReadOnlyDictionary<string, string?> overrides)
    {
        var userName = new Argument<string>("userName") { Description = "Whose roles to change." };
        var set = new Option<string>("--set") { Description = "The complete new set of roles, comma-separated.", Required = true };
        var roles = new Command("roles", "Replace a person's roles.") { userName, set };
        roles.SetAction((parse, ct) => RunAsync(overrides, async services =>
        {
            var newRoles = Split(parse.GetValue(set));
            await services.GetRequiredService<UserAccounts>().SetRolesAsync(Actor.System, parse.GetValue(userName)!, newRoles, ct);
            Console.WriteLine($"{parse.GetValue(userName)} now has roles {string.Join(", ", newRoles)}.");
        }, ct));
        return roles;
    }

    private static async Task<int> RunAsync(IReadOnlyDictionary<string, string?> overrides, Func<IServiceProvider, Task> work, CancellationToken ct)
    {
        try
        {
            using var host = await CliStore.OpenAsync(overrides, ct);
            await using var scope = host.Services.CreateAsyncScope();
            await work(scope.ServiceProvider);
            return 0;
        }
        catch (DomainRuleException e)
        {
            Console.Error.WriteLine($"error: {e.Message}");
            return 1;
        }
    }

    private static string Prompt(string userName) =>
        Console.IsInputRedirected
            ? throw new DomainRuleException("Standard input is not a terminal: pass --password-stdin and pipe the password in.")
            : AnsiConsole.Prompt(new TextPrompt<string>($"Password for {Markup.Escape(userName)}:").Secret());

    private static List<string> Split(string? list) =>
        (list ?? "").Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries).ToList();
}
