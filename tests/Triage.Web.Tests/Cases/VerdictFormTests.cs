using Bunit;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Web.Components.Pages.Cases;

namespace Triage.Web.Tests.Cases;

public sealed class VerdictFormTests : ComponentTest
{
    private readonly List<VerdictInput> _sent = [];

    private IRenderedComponent<VerdictForm> Form(bool amending = false) => Ctx.Render<VerdictForm>(p => p
        .Add(x => x.ClaimedAmount, 8400).Add(x => x.Amending, amending)
        .Add(x => x.Submit, v => { _sent.Add(v); return Task.FromResult(true); }));

    private static List<string> Problems(IRenderedComponent<VerdictForm> cut) => cut.FindAll(".form-problems li").Select(l => l.TextContent).ToList();

    [Fact]
    public void Each_outcome_offers_its_own_reasons_and_changing_the_outcome_clears_the_reason()
    {
        var cut = Form();
        Assert.True(cut.Find("#verdict-reason").HasAttribute("disabled"));
        foreach (var outcome in Enum.GetValues<VerdictOutcome>())
        {
            cut.Find("#verdict-outcome").Change(outcome.ToString());
            var offered = cut.FindAll("#verdict-reason option").Skip(1).Select(o => o.TextContent).ToList();
            Assert.Equal(VerdictReasons.ByOutcome[outcome], offered);
        }
        cut.Find("#verdict-outcome").Change(nameof(VerdictOutcome.NotFraud));
        cut.Find("#verdict-reason").Change("Error in the claim data");
        cut.Find("#verdict-outcome").Change(nameof(VerdictOutcome.Inconclusive));
        cut.Find("form").Submit();
        Assert.Equal(["Choose a reason that fits the outcome."], Problems(cut));
        Assert.Empty(_sent);
    }

    [Fact]
    public void Confirmed_fraud_needs_an_amount_saved_within_the_amount_claimed()
    {
        var cut = Form();
        cut.Find("form").Submit();
        Assert.Equal(["Choose an outcome."], Problems(cut));

        cut.Find("#verdict-outcome").Change(nameof(VerdictOutcome.ConfirmedFraud));
        cut.Find("#verdict-reason").Change("Amount exaggerated");
        cut.Find("#verdict-amount").Change("9000");
        cut.Find("form").Submit();
        Assert.Equal(["Give the amount saved, between 0 and the amount claimed (8,400.00)."], Problems(cut));

        cut.Find("#verdict-amount").Change("3150.50");
        cut.Find("#verdict-note").Change("  Repair invoice inflated.  ");
        cut.Find("form").Submit();
        Assert.Empty(Problems(cut));
        Assert.Equal([new VerdictInput(VerdictOutcome.ConfirmedFraud, "Amount exaggerated", "Repair invoice inflated.", 3150.50)], _sent);
    }

    [Fact]
    public void An_amendment_needs_a_note_saying_why()
    {
        var cut = Form(amending: true);
        cut.Find("#verdict-outcome").Change(nameof(VerdictOutcome.NotFraud));
        cut.Find("#verdict-reason").Change("Facts verified with documents");
        cut.Find("form").Submit();
        Assert.Equal(["Say in the note why the verdict is amended."], Problems(cut));
        Assert.Null(cut.FindAll("#verdict-amount").FirstOrDefault());
        cut.Find("#verdict-note").Change("Original receipts arrived.");
        cut.Find("form").Submit();
        Assert.Equal(VerdictOutcome.NotFraud, Assert.Single(_sent).Outcome);
    }
}
