using System.Text.Json;
using Triage.Cli.Demo;
using Triage.Scoring.Schema;

namespace Triage.Cli.Tests.Demo;

public sealed class DemoTeamAndPlaybookTests
{
    private static readonly string[] Roles = ["Investigator", "TeamLead", "Analyst", "Manager", "Admin"];
    private static readonly string[] NoEffectFields = ["branch_office", "policy_start_day_of_month"];

    private static JsonElement Load(string file) =>
        JsonDocument.Parse(File.ReadAllText(Path.Combine(DemoRun.Default, file))).RootElement;

    [Fact]
    public void Team_has_investigators_for_every_line_and_every_other_role()
    {
        var people = Load(DemoWriter.TeamFile).GetProperty("people").EnumerateArray().ToList();
        var roles = people.SelectMany(p => p.GetProperty("roles").EnumerateArray().Select(r => r.GetString()!)).ToList();
        Assert.All(roles, r => Assert.Contains(r, Roles));
        Assert.InRange(roles.Count(r => r == "Investigator"), 8, 10);
        Assert.Equal(2, roles.Count(r => r == "TeamLead"));
        Assert.All(new[] { "Analyst", "Manager", "Admin" }, r => Assert.Contains(r, roles));
        Assert.All(people, p => Assert.EndsWith("@larchmere.example", p.GetProperty("email").GetString()));
        Assert.Equal(people.Count, people.Select(p => p.GetProperty("userName").GetString()).Distinct().Count());
        var investigators = people.Where(p => p.GetProperty("roles").EnumerateArray().Any(r => r.GetString() == "Investigator")).ToList();
        foreach (var line in DemoSchema.Lines)
            Assert.Contains(investigators, p => p.GetProperty("lines").EnumerateArray().Any(l => l.GetString() == line));
        Assert.All(investigators, p => Assert.True(p.GetProperty("dailyCapacity").GetInt32() > 0));
    }

    [Fact]
    public void Playbook_covers_every_risk_field_with_two_to_four_checks()
    {
        var schema = DemoSchema.Build();
        var rules = Load(DemoWriter.PlaybookFile).GetProperty("rules").EnumerateArray().ToList();
        var fields = rules.Select(r => r.GetProperty("field").GetString()!).ToList();
        Assert.Equal(schema.FeatureNames.Except(NoEffectFields).Order(), fields.Order());
        foreach (var rule in rules)
        {
            Assert.Equal("raises", rule.GetProperty("direction").GetString());
            Assert.Equal("common practice", rule.GetProperty("basis").GetString());
            Assert.InRange(rule.GetProperty("checks").GetArrayLength(), 2, 4);
            if (rule.TryGetProperty("condition", out var condition))
                Assert.Contains(condition.GetProperty("op").GetString(), new[] { "lt", "lte", "gt", "gte", "eq", "in" });
        }
        Assert.All(Mechanisms.All, m => Assert.Contains(m.Field, fields));
    }
}
