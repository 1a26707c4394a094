using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Accounts;
using Triage.Cases.ApiKeys;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cases.Insights;
using Triage.Cases.Intake;
using Triage.Cases.Models;
using Triage.Cases.Queue;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Models;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Security;

/// <summary>
/// Who may do what, asked of the services directly (no page, no HTTP): the UI hiding a button is not the
/// control. deny = the service throws <see cref="AccessDeniedException"/>; allow = it gets past the role check
/// (a later business-rule refusal still counts as allowed, since the door opened).
/// </summary>
public sealed class ServiceAccessTests
{
    private const string Table = """
        action                      | no role | investigator | team lead | analyst | manager | admin
        open an unassigned case     | deny    | allow        | allow     | allow   | allow   | allow
        open own case               | deny    | allow        | allow     | allow   | allow   | allow
        open a colleague's case     | deny    | deny         | allow     | allow   | allow   | allow
        report on a colleague's case| deny    | deny         | allow     | allow   | allow   | allow
        take next                   | deny    | allow        | deny      | deny    | deny    | deny
        reassign cases              | deny    | deny         | allow     | deny    | deny    | allow
        read hit rates              | deny    | deny         | deny      | deny    | allow   | allow
        import claims               | deny    | deny         | deny      | allow   | deny    | allow
        export outcomes             | deny    | deny         | deny      | allow   | deny    | allow
        promote a model             | deny    | deny         | deny      | allow   | deny    | allow
        list API keys               | deny    | deny         | deny      | deny    | deny    | allow
        create an API key           | deny    | deny         | deny      | deny    | deny    | allow
        revoke an API key           | deny    | deny         | deny      | deny    | deny    | allow
        add a user                  | deny    | deny         | deny      | deny    | deny    | allow
        change a user's roles       | deny    | deny         | deny      | deny    | deny    | allow
        """;

    private static readonly (string Column, string? Role)[] Columns =
        [("no role", null), ("investigator", Roles.Investigator), ("team lead", Roles.TeamLead), ("analyst", Roles.Analyst), ("manager", Roles.Manager), ("admin", Roles.Admin)];

    private sealed record Cases(int Unassigned, int Own, int Colleagues, int KeyId);

    private static Func<IServiceProvider, Actor, Task> Action(string name, Cases c) => name switch
    {
        "open an unassigned case" => (sp, a) => sp.GetRequiredService<CaseWorkService>().OpenAsync(c.Unassigned, a),
        "open own case" => (sp, a) => sp.GetRequiredService<CaseWorkService>().OpenAsync(c.Own, a),
        "open a colleague's case" => (sp, a) => sp.GetRequiredService<CaseWorkService>().OpenAsync(c.Colleagues, a),
        "report on a colleague's case" => (sp, a) => sp.GetRequiredService<CaseWorkService>().ReportAsync(c.Colleagues, a),
        "take next" => (sp, a) => sp.GetRequiredService<TakeNextService>().TakeNextAsync(a),
        "reassign cases" => (sp, a) => sp.GetRequiredService<ReassignService>().ReassignAsync([], a.UserId, "nothing selected", a),
        "read hit rates" => (sp, a) => sp.GetRequiredService<InsightsService>().ByDriverAsync(a, new InsightFilter(null, null, null, null), default),
        "import claims" => (sp, a) => sp.GetRequiredService<ClaimIntake>().ImportAsync(IntakeFixture.Source(IntakeRows.Utf8("claim_number\n")), a),
        "export outcomes" => (sp, a) => sp.GetRequiredService<OutcomeExportService>().PrepareAsync(a, new ExportFilter(), default),
        "promote a model" => (sp, a) => sp.GetRequiredService<ModelRegistry>().PromoteAsync(a, "v1", "already serving", rescoreOpenCases: false),
        "list API keys" => (sp, a) => sp.GetRequiredService<ApiKeyService>().ListAsync(a),
        "create an API key" => (sp, a) => sp.GetRequiredService<ApiKeyService>().CreateAsync($"key of {a.UserName}", a),
        "revoke an API key" => (sp, a) => sp.GetRequiredService<ApiKeyService>().RevokeAsync(c.KeyId.ToString(), a),
        "add a user" => (sp, a) => sp.GetRequiredService<UserAccounts>().AddAsync(a,
            new NewAccount($"made.by.{a.UserName}", "Made", $"made.by.{a.UserName}@example.test", [Roles.Investigator], ["motor"], 1), TinySeed.Password),
        "change a user's roles" => (sp, a) => sp.GetRequiredService<UserAccounts>().SetRolesAsync(a, "tomas.reed", [Roles.Investigator]),
        _ => throw new FormatException($"No call for the action '{name}'."),
    };

    [Fact]
    public async Task Each_service_lets_in_exactly_the_roles_the_table_names()
    {
        await using var s = await ModelStore.CreateAsync();
        var ines = await UserAsync(s, "ines.varga");
        var tomas = await UserAsync(s, "tomas.reed");
        var cases = await PrepareAsync(s, ines, tomas);
        var lines = Table.Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        Assert.Equal(["action", .. Columns.Select(c => c.Column)], lines[0].Split('|', StringSplitOptions.TrimEntries));
        var wrong = new List<string>();
        foreach (var cells in lines.Skip(1).Select(l => l.Split('|', StringSplitOptions.TrimEntries)))
        {
            var act = Action(cells[0], cases);
            for (var col = 0; col < Columns.Length; col++)
            {
                // The investigator column is Ines herself, so "own" and "colleague's" mean something; the others are one-role people.
                var (column, role) = Columns[col];
                var actor = role == Roles.Investigator ? ines
                    : new Actor($"id-{column}", column.Replace(' ', '.'), role is null ? new HashSet<string>() : new HashSet<string> { role });
                var expected = cells[col + 1] == "allow";
                string? refusal = null;
                await using (var scope = s.Store.Host.Services.CreateAsyncScope())
                {
                    try { await act(scope.ServiceProvider, actor); }
                    catch (AccessDeniedException e) { refusal = e.Message; }
                    catch (DomainRuleException) { /* past the role check: a business rule spoke */ }
                }
                if (expected != (refusal is null))
                    wrong.Add($"{cells[0]} as {column}: expected {cells[col + 1]}, " + (refusal is null ? "was let in" : $"was refused ({refusal})"));
                if (refusal is not null) Assert.Contains(" may not ", refusal);
            }
        }
        Assert.True(wrong.Count == 0, "Cells that do not match the table:\n" + string.Join('\n', wrong));
    }

    private static async Task<Cases> PrepareAsync(ModelStore s, Actor ines, Actor tomas)
    {
        await using var scope = s.Store.Host.Services.CreateAsyncScope();
        var sp = scope.ServiceProvider;
        var own = (await sp.GetRequiredService<TakeNextService>().TakeNextAsync(ines))!.CaseId;
        var colleagues = (await sp.GetRequiredService<TakeNextService>().TakeNextAsync(tomas))!.CaseId;
        var key = await sp.GetRequiredService<ApiKeyService>().CreateAsync("to revoke", Actor.System);
        await using var db = s.Store.NewContext();
        var unassigned = await db.Cases.Where(c => c.IsOpen && c.AssigneeId == null).Select(c => c.Id).FirstAsync();
        return new Cases(unassigned, own, colleagues, key.Key.Id);
    }

    private static async Task<Actor> UserAsync(ModelStore s, string userName)
    {
        await using var db = s.Store.NewContext();
        var id = await db.Users.Where(u => u.UserName == userName).Select(u => u.Id).SingleAsync();
        return new Actor(id, userName, new HashSet<string> { Roles.Investigator });
    }
}
