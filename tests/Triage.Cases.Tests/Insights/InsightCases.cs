using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Insights;
using Triage.Cases.Tests.Support;
using Triage.Scoring.Explaining;

namespace Triage.Cases.Tests.Insights;

/// <summary>A fresh store plus builders for cases worked to a verdict, with drivers chosen by the test.</summary>
public sealed class InsightCases(string provider) : IAsyncDisposable
{
    public TestStore Store { get; } = TestStore.Create(provider);
    public TriageUser Ines { get; } = Build.User("ines");
    public TriageUser Tomas { get; } = Build.User("tomas");
    public static readonly Actor Manager = new("id-hollis", "hollis", new HashSet<string> { Roles.Manager });
    public static readonly Actor Investigator = new("id-ines", "ines", new HashSet<string> { Roles.Investigator });

    public static DateTime Day(int month, int day) => new(2027, month, day, 10, 0, 0, DateTimeKind.Utc);

    /// <summary>An open case whose raising drivers are <paramref name="raising"/> in rank order, plus one lowering driver.</summary>
    public static Case Open(string[] raising, double probability = 0.6, string line = "motor", string model = "v1", DateTime? opened = null,
        CaseSelection? selection = null)
    {
        var drivers = raising.Select((f, i) => new Driver(f, $"Field {f}", "x", 1.0 - 0.1 * i, 10 - i, "above typical"))
            .Append(new Driver("police_report", "Police report", "yes", -0.3, -4, "supplied")).ToList();
        var explanation = new Explanation(-1.5, Math.Log(probability / (1 - probability)), probability, drivers);
        return Case.Open(Build.Claim(line), explanation, model, new Dictionary<string, string?>(), [], opened ?? Day(1, 2), 10, Actor.System, selection);
    }

    /// <summary>A case worked by <paramref name="who"/> and closed with <paramref name="outcome"/> at <paramref name="at"/>.</summary>
    public static Case Closed(TriageUser who, string[] raising, VerdictOutcome outcome, DateTime at,
        double probability = 0.6, string line = "motor", string model = "v1", CaseSelection? selection = null)
    {
        var c = Open(raising, probability, line, model, selection: selection);
        var actor = Build.As(who);
        c.AssignTo(who, Actor.System, Day(1, 2));
        c.StartReview(actor, Day(1, 3));
        c.RecordVerdict(outcome, "found", null, outcome == VerdictOutcome.ConfirmedFraud ? 1000 : null, actor, at);
        return c;
    }

    /// <summary>Stores the two investigators and the cases (built with them) in one go.</summary>
    public async Task SaveAsync(params Case[] cases)
    {
        await using var db = await Store.MigratedAsync();
        db.Users.AddRange(Ines, Tomas);
        db.Cases.AddRange(cases);
        await db.SaveChangesAsync();
    }

    public InsightsService Service() => Store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<InsightsService>();

    public ValueTask DisposeAsync() => Store.DisposeAsync();
}
