using Microsoft.AspNetCore.Identity;
using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.Hosting;
using Triage.Cases.Intake;
using Triage.Cases.Tests.Support;
using Triage.Scoring.Models;

namespace Triage.Cases.Tests;

public sealed class FirstStartTests
{
    [SkippableTheory]
    [InlineData("Sqlite")]
    [InlineData("Postgres")]
    public async Task First_start_loads_the_seed_trains_scores_and_opens_cases(string provider)
    {
        await using var store = TestStore.Create(provider);
        var seed = store.WriteSeed(historyRows: 600, openRows: 80);
        await store.Host.Services.InitialiseStoreAsync();

        await using var db = store.NewContext();
        Assert.Equal(680, await db.Claims.CountAsync());

        // History keeps its outcomes, counted straight from the CSV text.
        var csvLines = File.ReadAllLines(Path.Combine(seed, "history.csv")).Skip(1).ToList();
        Assert.Equal(csvLines.Count(l => l.Contains(",confirmed_fraud,")),
            await db.Claims.CountAsync(c => c.Outcome == VerdictOutcome.ConfirmedFraud && c.State == ClaimState.Closed));
        Assert.Equal(600, await db.Claims.CountAsync(c => c.State == ClaimState.Closed));

        // Dates move by today − asOf: 2027-03-15 − 2026-11-30 = 105 days.
        var first = csvLines[0].Split(',');
        var reported = DateOnly.Parse(first[7]).AddDays(105);
        var stored = await db.Claims.SingleAsync(c => c.ClaimNumber == first[0]);
        Assert.Equal(reported.ToDateTime(TimeOnly.MinValue), stored.ReportDate);
        Assert.Equal(reported.ToString("yyyy-MM-dd"), stored.FieldValues()["report_date"]);
        Assert.DoesNotContain("_planted", stored.FieldValuesJson);

        // The first model is on disk and serving.
        var version = await db.ModelVersions.SingleAsync();
        Assert.True(version.IsServing);
        var paths = store.Host.Services.GetRequiredService<TriagePaths>();
        var model = ScoringModel.Load(Path.Combine(paths.DataFolder, version.FilePath));
        Assert.Equal(version.Version, model.Metadata.Version);

        // Cases are exactly the open claims the model puts at or above the threshold, with drivers as explained.
        var open = await db.Claims.Where(c => c.State == ClaimState.Open).ToListAsync();
        var expected = open.Where(c => model.Explain(c.FieldValues()).Probability >= 0.3).Select(c => c.ClaimNumber).Order().ToList();
        // Closed demo-history cases (HistoricCases) are left out here; HistoricCasesTests checks them.
        var cases = await db.Cases.Where(c => c.IsOpen).Include(c => c.Drivers).Include(c => c.Checks).Include(c => c.Claim).ToListAsync();
        Assert.NotEmpty(cases);
        Assert.Equal(expected, cases.Select(c => c.ClaimNumber).Order());
        foreach (var c in cases)
        {
            var again = model.Explain(c.Claim!.FieldValues());
            Assert.Equal(again.Probability, c.Probability, 12);
            Assert.Equal(again.Drivers.Select(d => (d.Field, Math.Round(d.Contribution, 9))),
                c.Drivers.OrderBy(d => d.Rank).Select(d => (d.Field, Math.Round(d.Contribution, 9))));
            Assert.Equal(again.Drivers.FirstOrDefault(d => d.Contribution > 0)?.DisplayName, c.TopDriver1);
            Assert.Equal(c.ClaimedAmount, c.Claim.ClaimedAmount);
            var amountRaises = c.Drivers.Any(d => d.Field == "claimed_amount" && d.Contribution > 0) && c.ClaimedAmount >= 5000;
            Assert.Equal(amountRaises, c.Checks.Any(k => k.Title == "Ask for the original invoices"));
            Assert.DoesNotContain(c.Checks, k => k.Title == "Confirm the small amount");
        }

        // Demo accounts exist with their roles and the demo password; investigators got a day's work on their lines.
        var users = store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<UserManager<TriageUser>>();
        var ines = await users.FindByNameAsync("ines.varga");
        Assert.NotNull(ines);
        Assert.True(await users.CheckPasswordAsync(ines, TinySeed.Password));
        Assert.Equal([Roles.Investigator], await users.GetRolesAsync(ines));
        Assert.Equal(4, await db.Users.CountAsync());
        var inesCases = cases.Where(c => c.AssigneeId == ines.Id).ToList();
        Assert.InRange(inesCases.Count, 1, 5);
        Assert.All(inesCases, c => Assert.Contains(c.Line, new[] { "motor", "home" }));
        Assert.True(await db.AuditEvents.AnyAsync(a => a.What == "model.promoted"));

        var allCases = await db.Cases.CountAsync();
        // A second start changes nothing.
        await store.Host.Services.InitialiseStoreAsync();
        await using var after = store.NewContext();
        Assert.Equal(680, await after.Claims.CountAsync());
        Assert.Equal(allCases, await after.Cases.CountAsync());
        Assert.Equal(1, await after.ModelVersions.CountAsync());
    }

    [Fact]
    public async Task A_bad_seed_row_names_file_row_and_column_and_leaves_the_store_empty()
    {
        await using var store = TestStore.Create();
        var seed = store.WriteSeed(historyRows: 50, openRows: 5);
        var file = Path.Combine(seed, "open-claims.csv");
        var lines = File.ReadAllLines(file);
        var cells = lines[3].Split(',');
        cells[7] = "15/03/2027";
        lines[3] = string.Join(',', cells);
        File.WriteAllLines(file, lines);

        var e = await Assert.ThrowsAsync<InvalidDataException>(() => store.Host.Services.InitialiseStoreAsync());
        Assert.Contains("open-claims.csv, data row 3", e.Message);
        Assert.Contains("report_date", e.Message);
        await using var db = store.NewContext();
        Assert.Equal(0, await db.Claims.CountAsync());
    }

    [Fact]
    public async Task An_unknown_provider_is_refused_on_start_naming_the_key()
    {
        await using var store = TestStore.Create(extra: new() { ["Storage:Provider"] = "Oracle" });
        var e = await Assert.ThrowsAsync<OptionsValidationException>(() => store.Host.StartAsync());
        Assert.Contains("Storage:Provider must be Sqlite or Postgres", e.Message);
    }

    [Fact]
    public async Task The_demo_needs_a_password_when_it_is_on()
    {
        await using var store = TestStore.Create(extra: new() { ["Demo:Password"] = "" });
        var e = await Assert.ThrowsAsync<OptionsValidationException>(() => store.Host.StartAsync());
        Assert.Contains("Demo:Password is required when Demo:Enabled is true", e.Message);
    }

    [Fact]
    public void Checks_follow_the_raising_drivers_in_rank_order_once_each()
    {
        var rules = new[]
        {
            new PlaybookRule("b", DriverDirection.Raises, null, null, "x", [new PlaybookCheck("B1", ""), new PlaybookCheck("Shared", "")]),
            new PlaybookRule("a", DriverDirection.Raises, null, null, "x", [new PlaybookCheck("A1", ""), new PlaybookCheck("Shared", "")]),
            new PlaybookRule("c", DriverDirection.Lowers, null, null, "x", [new PlaybookCheck("C1", "")]),
        };
        DriverSnapshot D(int rank, string field, double contribution) => new(rank, field, field, "", contribution, 0, "");
        var checks = CaseOpener.ChecksFor([D(2, "b", 0.2), D(1, "a", 0.5), D(3, "c", -0.4)], new Dictionary<string, string?>(), rules).ToList();
        Assert.Equal(["A1", "Shared", "B1"], checks.Select(c => c.Title));
        Assert.Equal(["a", "a", "b"], checks.Select(c => c.DriverField));
    }
}
