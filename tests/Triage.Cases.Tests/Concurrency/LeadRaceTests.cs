using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.TeamLead;
using Triage.Cases.Tests.Support;
using Xunit.Abstractions;
using static Triage.Cases.Tests.Concurrency.RaceCases;
using static Triage.Cases.Tests.TeamLead.TeamStore;

namespace Triage.Cases.Tests.Concurrency;

/// <summary>Team leads moving a case while someone else moves or closes it: one wins whole, the other is told why.</summary>
public sealed class LeadRaceTests(ITestOutputHelper output)
{
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task Two_leads_reassigning_one_case_one_wins_the_other_is_told_who_has_it(string provider)
    {
        await using var store = TestStore.Create(provider);
        await AddTeamAsync(store);
        var cases = await AddAsync(store, Race.Count);
        var winners = new Dictionary<int, (Actor Lead, string To)>();
        foreach (var c in cases)
        {
            var (a, b) = await Race.RunAsync<ReassignService, ReassignService>(store,
                s => s.ReassignAsync([c.Seen], Ines.UserId, "balance the pool", Lead),
                s => s.ReassignAsync([c.Seen], Tomas.UserId, "Tomas knows the repairer", OtherLead));
            Assert.True((a is null) != (b is null), $"case {c.ClaimNumber}: expected one winner, got {a?.Message ?? "success"} / {b?.Message ?? "success"}");
            var (winner, to, refusal) = a is null ? (Lead, Ines.UserId, b!) : (OtherLead, Tomas.UserId, a);
            var refused = Assert.IsType<ReassignRefusedException>(refusal);
            AssertExplained(refusal, $"Nothing was reassigned: Case {c.ClaimNumber} changed meanwhile (now with {to[3..].ToUpperInvariant()}).");
            Assert.Single(refused.Reasons);
            winners[c.Id] = (winner, to);
        }

        await using var db = store.NewContext();
        var stored = await LoadAsync(db);
        foreach (var c in cases)
        {
            var (lead, to) = winners[c.Id];
            var s = stored[c.Id];
            Assert.Equal(to, s.AssigneeId);
            var moved = Assert.Single(s.Assignments);
            Assert.Equal((null, to, lead.UserName), (moved.FromUserId, moved.ToUserId, moved.By));
            Assert.Equal(lead.UserName, Assert.Single(s.Audit, x => x.What == "case.assigned").Who);
        }
        output.WriteLine($"{provider}: {cases.Count} races, {cases.Count} refusals explained; the first lead won {winners.Values.Count(w => w.Lead == Lead)}");
    }

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task A_verdict_against_a_reassignment_one_wins_whole_the_other_is_told_what_happened(string provider)
    {
        await using var store = TestStore.Create(provider);
        await AddTeamAsync(store);
        var cases = await AddAsync(store, Race.Count, InInesReview);
        var verdictWon = new HashSet<int>();
        foreach (var c in cases)
        {
            var (verdict, move) = await Race.RunAsync<CaseWorkService, ReassignService>(store,
                s => s.RecordVerdictAsync(c.Id, NotFraud, c.Stamp, Ines),
                s => s.ReassignAsync([c.Seen], Tomas.UserId, "Ines is on leave", Lead));
            Assert.True((verdict is null) != (move is null), $"case {c.ClaimNumber}: expected one winner, got {verdict?.Message ?? "success"} / {move?.Message ?? "success"}");
            if (verdict is null)
            {
                verdictWon.Add(c.Id);
                Assert.IsType<ReassignRefusedException>(move);
                AssertExplained(move!, $"Nothing was reassigned: Case {c.ClaimNumber} was closed meanwhile.");
            }
            else
            {
                Assert.IsType<CaseChangedException>(verdict);
                AssertExplained(verdict, $"Case {c.ClaimNumber} changed after you opened it: lead reassigned it to tomas: Ines is on leave. Nothing of yours was saved");
            }
        }

        await using var db = store.NewContext();
        var stored = await LoadAsync(db);
        foreach (var c in cases)
        {
            var s = stored[c.Id];
            if (verdictWon.Contains(c.Id))
            {
                Assert.Equal((CaseStatus.Closed, Ines.UserId, VerdictOutcome.NotFraud), (s.Status, s.AssigneeId, s.Claim!.Outcome));
                Assert.Equal(VerdictOutcome.NotFraud, Assert.Single(s.Verdicts).Outcome);
                Assert.Single(s.Assignments);
                Assert.DoesNotContain(s.Audit, x => x.What == "case.assigned" && x.Who == Lead.UserName && x.Detail!.Contains("tomas"));
            }
            else
            {
                Assert.Equal((CaseStatus.Assigned, Tomas.UserId, (VerdictOutcome?)null), (s.Status, s.AssigneeId, s.Claim!.Outcome));
                Assert.True(s.IsOpen);
                Assert.Empty(s.Verdicts);
                Assert.Equal(2, s.Assignments.Count);
                Assert.DoesNotContain(s.Audit, x => x.What == "verdict.recorded");
            }
        }
        output.WriteLine($"{provider}: {cases.Count} races, {cases.Count} refusals explained; the verdict won {verdictWon.Count}, the reassignment {cases.Count - verdictWon.Count}");
    }
}
