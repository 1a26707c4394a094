using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;
using Triage.Scoring;
using Triage.Scoring.Models;

namespace Triage.Cases.Tests.Models;

public class ModelVersionRulesTests
{
    private static readonly DateTime Now = Build.Now;
    private static readonly Actor Olu = new("id-olu", "olu", new HashSet<string> { Roles.Analyst });

    private static ModelVersion Version(string name) => ModelVersion.Register(
        new ModelMetadata(name, TrainerKind.FastTree, Now, "h", 10, 5, 0.1, new HoldoutMetrics(0.8, 0.4, 0.1, 0.3), "olu"), $"models/{name}.model");

    [Fact]
    public void A_new_version_is_a_challenger_and_promotion_retires_the_champion()
    {
        var v1 = Version("v1");
        var v2 = Version("v2");
        Assert.Equal(ModelStatus.Challenger, v1.Status);
        v1.Promote(null, Olu, Now, "first");
        v2.Promote(v1, Olu, Now.AddDays(1), "  better recall at capacity ");
        Assert.Equal((ModelStatus.Retired, false), (v1.Status, v1.IsServing));
        Assert.Equal((ModelStatus.Champion, true, "olu", "better recall at capacity"), (v2.Status, v2.IsServing, v2.PromotedBy, v2.PromotionNote));
        Assert.Equal([ModelChangeKind.Trained, ModelChangeKind.Promoted], v2.Changes.Select(c => c.Kind));
        Assert.Equal("v1", v2.Changes[^1].OtherVersion);
        Assert.Equal((ModelChangeKind.Retired, "v2"), (v1.Changes[^1].Kind, v1.Changes[^1].OtherVersion));
    }

    [Fact]
    public void Roll_back_brings_back_a_version_that_served_before()
    {
        var (v1, v2, v3) = (Version("v1"), Version("v2"), Version("v3"));
        v1.Promote(null, Olu, Now, "first");
        v2.Promote(v1, Olu, Now, "second");
        v3.Promote(v2, Olu, Now, "third");
        v1.RollBackTo(v3, Olu, Now.AddHours(1), "v3 floods the queue with travel claims");
        Assert.True(v1.IsServing);
        Assert.Equal(ModelStatus.Retired, v3.Status);
        Assert.Equal(ModelChangeKind.RolledBack, v1.Changes[^1].Kind);
        Assert.Equal("v3", v1.Changes[^1].OtherVersion);
        // And forward again to a later retired version.
        v3.RollBackTo(v1, Olu, Now.AddHours(2), "travel rule fixed upstream");
        Assert.True(v3.IsServing);
    }

    [Fact]
    public void Nonsense_is_refused_with_a_reason()
    {
        var (v1, v2, v3) = (Version("v1"), Version("v2"), Version("v3"));
        v1.Promote(null, Olu, Now, "first");
        Assert.Contains("already serving", Assert.Throws<DomainRuleException>(() => v1.Promote(null, Olu, Now, "again")).Message);
        Assert.Contains("never served", Assert.Throws<DomainRuleException>(() => v2.RollBackTo(v1, Olu, Now, "x")).Message);
        Assert.Contains("note is required", Assert.Throws<DomainRuleException>(() => v2.Promote(v1, Olu, Now, " ")).Message);
        Assert.Contains("serving now", Assert.Throws<DomainRuleException>(() => v1.RollBackTo(null, Olu, Now, "x")).Message);
        v2.Promote(v1, Olu, Now, "second");
        Assert.Contains("roll back to it instead", Assert.Throws<DomainRuleException>(() => v1.Promote(v2, Olu, Now, "x")).Message);
        // A stale "serving" copy (someone else promoted meanwhile) is refused rather than leaving two champions.
        Assert.Contains("not the serving model", Assert.Throws<DomainRuleException>(() => v3.Promote(v1, Olu, Now, "x")).Message);
        Assert.Equal(ModelStatus.Challenger, v3.Status);
    }
}
