using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;
using Xunit.Abstractions;
using static Triage.Cases.Tests.Concurrency.RaceCases;
using static Triage.Cases.Tests.TeamLead.TeamStore;

namespace Triage.Cases.Tests.Concurrency;

/// <summary>
/// A verdict and an amendment on one case at once. On a case in review, Ines records the verdict while a lead
/// amends from the same view: the lead cannot amend what is not there yet. On a closed case, Ines amends her
/// verdict while the lead amends it too: one amendment lands, never two current verdicts.
/// </summary>
public sealed class VerdictRaceTests(ITestOutputHelper output)
{
    private static readonly VerdictInput InesAmends = new(VerdictOutcome.ConfirmedFraud, "Amount exaggerated", "The invoices were altered.", null);
    private static readonly VerdictInput LeadAmends = new(VerdictOutcome.Inconclusive, "Evidence insufficient either way", "The invoices prove nothing either way.", null);

    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task A_verdict_against_an_amendment_leaves_exactly_one_current_verdict_and_explains_the_refusal(string provider)
    {
        await using var store = TestStore.Create(provider);
        await AddTeamAsync(store);
        var inReview = await AddAsync(store, Race.Count / 2, InInesReview);
        var closed = await AddAsync(store, Race.Count - Race.Count / 2, ClosedByInes);
        int explained = 0, foundNoVerdict = 0;

        foreach (var c in inReview)
        {
            var (verdict, amend) = await Race.RunAsync<CaseWorkService, CaseWorkService>(store,
                s => s.RecordVerdictAsync(c.Id, NotFraud, c.Stamp, Ines),
                s => s.AmendVerdictAsync(c.Id, LeadAmends, c.Stamp, Lead));
            Assert.Null(verdict);
            // Read before the verdict landed, the amendment finds none; read after, the case has changed under it.
            AssertExplained(amend!, $"Case {c.ClaimNumber} has no verdict yet; record one before amending it.",
                $"Case {c.ClaimNumber} changed after you opened it: ines recorded the verdict NotFraud and closed the case. Nothing of yours was saved");
            explained++;
            if (amend is DomainRuleException) foundNoVerdict++;
        }

        var inesWon = new HashSet<int>();
        foreach (var c in closed)
        {
            var (ines, lead) = await Race.RunAsync<CaseWorkService, CaseWorkService>(store,
                s => s.AmendVerdictAsync(c.Id, InesAmends, c.Stamp, Ines),
                s => s.AmendVerdictAsync(c.Id, LeadAmends, c.Stamp, Lead));
            Assert.True((ines is null) != (lead is null), $"case {c.ClaimNumber}: expected one winner, got {ines?.Message ?? "success"} / {lead?.Message ?? "success"}");
            var (winner, outcome, refusal) = ines is null ? ("ines", InesAmends.Outcome, lead!) : ("lead", LeadAmends.Outcome, ines);
            if (ines is null) inesWon.Add(c.Id);
            Assert.IsType<CaseChangedException>(refusal);
            AssertExplained(refusal, $"Case {c.ClaimNumber} changed after you opened it: {winner} amended the verdict (NotFraud → {outcome}). Nothing of yours was saved");
            explained++;
        }

        await using var db = store.NewContext();
        var stored = await LoadAsync(db);
        foreach (var c in inReview)
        {
            var s = stored[c.Id];
            Assert.Equal((CaseStatus.Closed, VerdictOutcome.NotFraud), (s.Status, s.Claim!.Outcome));
            Assert.Equal(VerdictOutcome.NotFraud, Assert.Single(s.Verdicts).Outcome);
            Assert.DoesNotContain(s.Audit, x => x.What == "verdict.amended");
        }
        foreach (var c in closed)
        {
            var s = stored[c.Id];
            var expected = inesWon.Contains(c.Id) ? (InesAmends.Outcome, "ines") : (LeadAmends.Outcome, "lead");
            Assert.Equal(2, s.Verdicts.Count);
            var original = Assert.Single(s.Verdicts, v => v.AmendsVerdictId is null);
            var current = Assert.Single(s.Verdicts, v => v.IsCurrent);
            Assert.NotNull(original.SupersededAt);
            Assert.Equal((original.Id, expected.Item1, expected.Item2), (current.AmendsVerdictId!.Value, current.Outcome, current.By));
            Assert.Equal(expected.Item1, s.Claim!.Outcome);
            Assert.Equal(expected.Item2, Assert.Single(s.Audit, x => x.What == "verdict.amended").Who);
        }
        output.WriteLine($"{provider}: {Race.Count} races ({inReview.Count} verdict vs amendment on a case in review, {closed.Count} amendment vs amendment on a closed case), " +
            $"{explained} refusals explained ({foundNoVerdict} amendments found no verdict yet, {inReview.Count - foundNoVerdict} found the case closed meanwhile); Ines's amendment won {inesWon.Count}, the lead's {closed.Count - inesWon.Count}");
    }
}
