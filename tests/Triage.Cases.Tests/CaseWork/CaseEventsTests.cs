using Triage.Cases.CaseWork;

namespace Triage.Cases.Tests.CaseWork;

public sealed class CaseEventsTests
{
    [Fact]
    public void Subscribers_hear_every_change_until_they_dispose_their_subscription()
    {
        var events = new CaseEvents();
        var a = new List<CaseChanged>();
        var b = new List<CaseChanged>();
        var subA = events.Subscribe(a.Add);
        using var subB = events.Subscribe(b.Add);
        events.Publish(7, "note.added");
        subA.Dispose();
        subA.Dispose();
        events.Publish(8, "case.assigned");
        Assert.Equal([new CaseChanged(7, "note.added")], a);
        Assert.Equal([new CaseChanged(7, "note.added"), new CaseChanged(8, "case.assigned")], b);
    }
}
