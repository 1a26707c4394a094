using Triage.Cases.Domain;

namespace Triage.Cases.Tests;

public sealed class PlaybookRuleTests
{
    private static DriverSnapshot Driver(string field, double contribution) => new(1, field, field, "", contribution, 0, "");

    private static PlaybookRule Rule(string field, DriverDirection dir, ConditionOp? op = null, string? value = null) =>
        new(field, dir, op, value, "test", [new PlaybookCheck("t", "d")]);

    [Theory]
    [InlineData(ConditionOp.Lt, "30", "12", true)]
    [InlineData(ConditionOp.Lt, "30", "30", false)]
    [InlineData(ConditionOp.Lte, "30", "30", true)]
    [InlineData(ConditionOp.Gt, "30", "31.5", true)]
    [InlineData(ConditionOp.Gte, "30", "29.9", false)]
    [InlineData(ConditionOp.Eq, "3", "3.0", true)]
    [InlineData(ConditionOp.Eq, "\"RP-07\"", "RP-07", true)]
    [InlineData(ConditionOp.In, "[\"RP-07\",\"RP-09\"]", "RP-09", true)]
    [InlineData(ConditionOp.In, "[\"RP-07\",\"RP-09\"]", "RP-10", false)]
    public void Conditions_compare_the_scored_value(ConditionOp op, string json, string value, bool expected)
    {
        var rule = Rule("f", DriverDirection.Raises, op, json);
        Assert.Equal(expected, rule.Matches(Driver("f", 0.5), new Dictionary<string, string?> { ["f"] = value }));
    }

    [Fact]
    public void Direction_field_and_missing_values_must_fit()
    {
        var values = new Dictionary<string, string?> { ["f"] = "5", ["g"] = null };
        Assert.True(Rule("f", DriverDirection.Raises).Matches(Driver("f", 0.2), values));
        Assert.False(Rule("f", DriverDirection.Raises).Matches(Driver("f", -0.2), values));
        Assert.True(Rule("f", DriverDirection.Lowers).Matches(Driver("f", -0.2), values));
        Assert.False(Rule("f", DriverDirection.Raises).Matches(Driver("h", 0.2), values));
        Assert.False(Rule("g", DriverDirection.Raises, ConditionOp.Gt, "1").Matches(Driver("g", 0.2), values));
    }

    [Fact]
    public void A_rule_needs_checks_and_a_whole_condition()
    {
        Assert.Throws<DomainRuleException>(() => new PlaybookRule("f", DriverDirection.Raises, null, null, "b", []));
        Assert.Throws<DomainRuleException>(() => new PlaybookRule("f", DriverDirection.Raises, ConditionOp.Gt, null, "b", [new PlaybookCheck("t", "d")]));
    }
}
