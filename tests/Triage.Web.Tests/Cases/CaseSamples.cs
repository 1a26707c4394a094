using Triage.Cases.CaseFile;
using Triage.Cases.Domain;
using Triage.Scoring.Explaining;

namespace Triage.Web.Tests.Cases;

/// <summary>In-memory cases for component and report tests (no store): one raising driver with a check, one without, one lowering.</summary>
public static class CaseSamples
{
    public static readonly DateTime Now = new(2027, 3, 15, 9, 30, 0, DateTimeKind.Utc);
    public static readonly TriageUser Ines = new() { Id = "id-ines", UserName = "ines.varga", DisplayName = "Ines Varga", Lines = "motor" };
    public static readonly Actor InesActor = new(Ines.Id, Ines.UserName!, new HashSet<string> { Roles.Investigator });

    // Effects apportion score − base rate by contribution: base −1.2 log-odds, contributions 1.1, 0.5, −0.4.
    public static Case Case()
    {
        double[] phi = [1.1, 0.5, -0.4];
        var logOdds = -1.2 + phi.Sum();
        var p = 1 / (1 + Math.Exp(-logOdds));
        var spread = (p - 1 / (1 + Math.Exp(1.2))) * 100;
        Driver D(string field, string name, string value, double x, string cmp) => new(field, name, value, x, spread * x / phi.Sum(), cmp);
        var claim = Claim.Receive("LM-2027-0412", "motor", Now.AddDays(-3), Now.AddDays(-9), Now.AddDays(-40), 8400,
            new Dictionary<string, string?> { ["loss_cause"] = "collision", ["policy_limit"] = "25000" });
        return Triage.Cases.Domain.Case.Open(claim, new Explanation(-1.2, logOdds, p,
            [
                D("cover_raised_days_before_loss", "Cover raised before loss", "6 days", 1.1, "much sooner than typical (median 210 days)"),
                D("prior_claims_3y", "Prior claims (3 years)", "3", 0.5, "more than 9 in 10 claims"),
                D("police_report", "Police report", "yes", -0.4, "supplied, as in most honest claims"),
            ]), "fasttree-2027-03-01", new Dictionary<string, string?>(),
            [new CheckItem("cover_raised_days_before_loss", 1, "Ask why cover was raised", "Compare the change date with the loss date.", "test")],
            Now.AddDays(-2), 10, Actor.System);
    }

    public static CaseFileView View(Case c, QueueRank? rank = null)
    {
        var raising = c.Drivers.Where(d => d.Raises).OrderBy(d => d.Rank)
            .Select(d => new DriverWithChecks(d, c.Checks.Where(k => k.DriverField == d.Field).ToList(), [])).ToList();
        var lowering = c.Drivers.Where(d => !d.Raises).Select(d => new DriverWithChecks(d, [], [])).ToList();
        return new CaseFileView(c, c.Claim!, raising, lowering, rank, new CaseStamp(c.Version, 0), []);
    }
}
