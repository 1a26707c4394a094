using Microsoft.AspNetCore.Identity;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cli.Users;

namespace Triage.Cli.Tests.Users;

/// <summary>`triage users` against a fresh SQLite store in a temp folder, with the demo off.</summary>
[Collection(Triage.Cli.Tests.Support.ConsoleCollection.Name)]
public sealed class UsersCommandTests : IDisposable
{
    private readonly string _folder = Path.Combine(Path.GetTempPath(), "triage-cli-users", Guid.NewGuid().ToString("N"));
    private readonly Dictionary<string, string?> _settings;

    public UsersCommandTests() => _settings = new()
    {
        ["Storage:Provider"] = "Sqlite",
        ["Storage:DataFolder"] = _folder,
        ["Storage:ConnectionString"] = null,
        ["Demo:Enabled"] = "false",
    };

    public void Dispose()
    {
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        try { Directory.Delete(_folder, recursive: true); } catch (IOException) { /* a file still open */ }
    }

    private Task<int> Run(string stdin, params string[] args) =>
        UsersCommand.Create(new StringReader(stdin), _settings).Parse(args).InvokeAsync();

    private async Task<(TriageUser User, IList<string> Roles, bool PasswordOk)> Read(string userName, string password)
    {
        using var host = await CliStore.OpenAsync(_settings, default);
        using var scope = host.Services.CreateScope();
        var users = scope.ServiceProvider.GetRequiredService<UserManager<TriageUser>>();
        var user = (await users.FindByNameAsync(userName))!;
        return (user, await users.GetRolesAsync(user), await users.CheckPasswordAsync(user, password));
    }

    [Fact]
    public async Task Add_creates_a_user_who_can_sign_in_with_roles_lines_and_capacity()
    {
        var code = await Run("Quiet-harbour-42\n", "add", "ines.varga", "--name", "Ines Varga", "--email", "ines@larchmere.test",
            "--roles", "investigator,TeamLead", "--lines", "motor, home", "--capacity", "8", "--password-stdin");
        Assert.Equal(0, code);
        var (user, roles, ok) = await Read("ines.varga", "Quiet-harbour-42");
        Assert.True(ok);
        Assert.Equal(["Investigator", "TeamLead"], roles.Order());
        Assert.Equal(("Ines Varga", "motor,home", 8, true), (user.DisplayName, user.Lines, user.DailyCapacity, user.LockoutEnabled));
    }

    [Fact]
    public async Task Roles_set_replaces_the_whole_set()
    {
        Assert.Equal(0, await Run("Quiet-harbour-42\n", "add", "olu", "--name", "Olu Berg", "--email", "olu@larchmere.test",
            "--roles", "Analyst,Admin", "--password-stdin"));
        Assert.Equal(0, await Run("", "roles", "olu", "--set", "Manager"));
        Assert.Equal(["Manager"], (await Read("olu", "Quiet-harbour-42")).Roles);
    }

    [Theory]
    [InlineData("Investigator,Boss", "Quiet-harbour-42")]
    [InlineData("Investigator", "short")]
    [InlineData("", "Quiet-harbour-42")]
    public async Task Bad_roles_or_a_weak_password_fail_without_creating_anyone(string roles, string password)
    {
        var code = await Run(password + "\n", "add", "tomas", "--name", "Tomas Reed", "--email", "tomas@larchmere.test",
            "--roles", roles, "--password-stdin");
        Assert.Equal(1, code);
        using var host = await CliStore.OpenAsync(_settings, default);
        using var scope = host.Services.CreateScope();
        Assert.Null(await scope.ServiceProvider.GetRequiredService<UserManager<TriageUser>>().FindByNameAsync("tomas"));
    }
}
