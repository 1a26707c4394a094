using System.Diagnostics.Metrics;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Instances;
using Triage.Cases.Intake;
using Triage.Cases.Models;
using Triage.Cases.Operations;

namespace Triage.Cases.Tests.Instances;

public class InstanceNoticeTests
{
    private sealed class Outbox : IInstanceNotices
    {
        public List<InstanceNotice> Sent { get; } = [];
        public void Send(InstanceNotice notice) => Sent.Add(notice);
    }

    [Fact]
    public void A_notice_survives_the_payload_and_foreign_payloads_are_not_notices()
    {
        var notice = new InstanceNotice("host/12/ab12cd", "case.assigned", CaseId: 42);
        Assert.Equal(notice, InstanceNotice.FromPayload(notice.ToPayload()));
        var model = new InstanceNotice("host/12/ab12cd", "model.promoted", Model: "v7");
        Assert.Equal(model, InstanceNotice.FromPayload(model.ToPayload()));
        Assert.DoesNotContain("caseId", model.ToPayload());
        Assert.Null(InstanceNotice.FromPayload("hello"));
        Assert.Null(InstanceNotice.FromPayload("""{"what":"case.assigned"}"""));
        Assert.Null(InstanceNotice.FromPayload("[1,2]"));
    }

    [Fact]
    public void A_change_is_told_here_and_sent_to_the_others_once_while_a_relayed_change_is_told_here_only()
    {
        var outbox = new Outbox();
        var self = new InstanceId();
        var events = new CaseEvents(outbox, self);
        var heard = new List<CaseChanged>();
        using var sub = events.Subscribe(heard.Add);
        events.Publish(5, "note.added");
        events.PublishLocal(6, "case.assigned");
        Assert.Equal([new CaseChanged(5, "note.added"), new CaseChanged(6, "case.assigned")], heard);
        Assert.Equal([new InstanceNotice(self.Value, "note.added", CaseId: 5)], outbox.Sent);
        Assert.NotEqual(self.Value, new InstanceId().Value);
    }

    [Fact]
    public void Case_changes_are_counted_by_kind_on_the_Triage_meter()
    {
        using var services = new ServiceCollection().AddMetrics().AddSingleton<TriageMetrics>().BuildServiceProvider();
        var counted = new List<(string Instrument, long Value, string? What)>();
        using var listener = new MeterListener();
        // Only this provider's meter (the factory hands out one per name): tests running beside this one count on their own.
        var meter = services.GetRequiredService<IMeterFactory>().Create(TriageMetrics.MeterName);
        listener.InstrumentPublished = (instrument, l) => { if (ReferenceEquals(instrument.Meter, meter)) l.EnableMeasurementEvents(instrument); };
        listener.SetMeasurementEventCallback<long>((instrument, value, tags, _) =>
        {
            lock (counted) counted.Add((instrument.Name, value, tags.ToArray().FirstOrDefault(t => t.Key == "what").Value as string));
        });
        listener.Start();
        var events = new CaseEvents(metrics: services.GetRequiredService<TriageMetrics>());
        events.Publish(1, "verdict.recorded");
        events.Publish(2, "case.assigned");
        events.PublishLocal(3, "case.assigned");
        Assert.Equal([("triage.case.changes", 1L, "verdict.recorded"), ("triage.case.changes", 1L, "case.assigned")], counted);
    }

    [Fact]
    public async Task The_model_check_picks_up_a_promotion_made_elsewhere_without_any_notice()
    {
        // SQLite sends no notices: only the periodic check (every second here) can switch B.
        await using var two = await TwoInstances.StartAsync("Sqlite", new() { ["Instances:ModelCheckSeconds"] = "1" });
        var servingOnB = two.B.Services.GetRequiredService<ServingModels>();
        await TwoInstances.EventuallyAsync(() => servingOnB.Version == "v1", "B to load v1");
        var analyst = new Actor("id-analyst", "ana.lyst", new HashSet<string> { Roles.Analyst });
        var result = await two.InScopeAsync(two.A, sp => { var r = sp.GetRequiredService<RetrainService>(); return r.RunAsync(analyst, r.Defaults()); });
        Assert.Equal("v2", result.Version);
        await two.InScopeAsync(two.A, sp => sp.GetRequiredService<ModelRegistry>().PromoteAsync(analyst, "v2", "test", rescoreOpenCases: false));
        await TwoInstances.EventuallyAsync(() => servingOnB.Version == "v2", "B's model check to load v2");
    }
}
