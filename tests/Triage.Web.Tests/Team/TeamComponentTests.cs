using System.Text.RegularExpressions;
using Bunit;
using Triage.Cases.Domain;
using Triage.Cases.TeamLead;
using Triage.Web.Components.Pages.Team;
using Triage.Web.Tests.Cases;

namespace Triage.Web.Tests.Team;

public sealed class TeamComponentTests : ComponentTest
{
    private static TriageUser User(string name, string lines, int capacity, bool absent = false)
    {
        var u = new TriageUser { Id = $"id-{name}", UserName = name, DisplayName = name.ToUpperInvariant(), Lines = lines, DailyCapacity = capacity };
        if (absent) u.MarkAbsent(new DateTime(2027, 3, 15), "leave");
        return u;
    }

    private static readonly PersonLoad Ines = new(User("ines", "motor,home", 5), Open: 4, Overdue: 1, TakenToday: 2, ClosedThisWeek: 3);
    private static readonly PersonLoad Kit = new(User("kit", "travel", 6, absent: true), Open: 2, Overdue: 0, TakenToday: 0, ClosedThisWeek: 1);

    [Fact]
    public void Workload_rows_show_the_day_per_person_flag_absence_and_total_only_present_capacity()
    {
        var table = Ctx.Render<WorkloadTable>(p => p.Add(x => x.People, [Ines, Kit]));
        var ines = table.Find("[data-testid=person-ines]");
        Assert.Equal(["4", "1", "2", "3", "3"], new[] { "open", "overdue", "taken-today", "left-today", "closed-week" }
            .Select(id => ines.QuerySelector($"[data-testid={id}]")!.TextContent.Trim()));
        Assert.Empty(ines.QuerySelectorAll("[data-testid=absent]"));
        var kit = table.Find("[data-testid=person-kit]");
        Assert.Single(kit.QuerySelectorAll("[data-testid=absent]"));
        Assert.Equal("—", kit.QuerySelector("[data-testid=left-today]")!.TextContent.Trim());
        Assert.Equal("3", table.Find("[data-testid=team-left]").TextContent.Trim());
    }

    [Fact]
    public void Workload_button_asks_for_that_persons_cases()
    {
        string? asked = null;
        var table = Ctx.Render<WorkloadTable>(p => p.Add(x => x.People, [Ines, Kit]).Add(x => x.OnShowCases, (string id) => asked = id));
        table.Find("[data-testid=person-kit] [data-testid=show-cases]").Click();
        Assert.Equal("id-kit", asked);
    }

    [Fact]
    public void Pool_table_folds_lines_and_bands_and_totals_them()
    {
        var pool = new PoolSummary(WorkloadService.Bands.Select(b => b.Label).ToList(),
            [new PoolLine("home", 3, [0, 1, 0, 0, 2]), new PoolLine("motor", 4, [2, 0, 1, 1, 0])]);
        var table = Ctx.Render<PoolTable>(p => p.Add(x => x.Pool, pool));
        Assert.Equal("3", table.Find("[data-testid=pool-home] [data-testid=pool-count]").TextContent.Trim());
        Assert.Equal("7", table.Find("[data-testid=pool-total]").TextContent.Trim());
        Assert.Equal(["Line", "80–100", "60–79", "40–59", "20–39", "0–19", "All", ""],
            table.FindAll("thead th").Select(th => th.TextContent.Trim()));
        Assert.Equal(["motor", "2", "·", "1", "1", "·", "4", "Cases"], table.FindAll("[data-testid=pool-motor] td").Select(td => td.TextContent.Trim()));
    }

    [Fact]
    public void Plan_view_shows_counts_per_person_and_why_cases_stay()
    {
        var plan = new BalancePlan(new DateTime(2027, 3, 15, 9, 30, 0),
            [new PlannedCase(1, Guid.NewGuid(), "C-1", "motor", 91, "id-ines", "INES"), new PlannedCase(2, Guid.NewGuid(), "C-2", "home", 80, "id-ines", "INES")],
            [new PlannedShare("id-ines", "INES", false, 3, 2), new PlannedShare("id-kit", "KIT", true, 0, 0)],
            [new LeftInPool("travel", 5, "Everyone who works travel claims is marked absent.")], 10, 10);
        var view = Ctx.Render<PlanView>(p => p.Add(x => x.Plan, plan));
        Assert.Contains("Hands out 2 cases to 1 investigator, riskiest first.", Regex.Replace(view.Find("[data-testid=plan-summary]").TextContent, @"\s+", " "));
        Assert.Equal("2", view.Find("[data-testid=share-id-ines] [data-testid=gets]").TextContent.Trim());
        Assert.Contains("(absent)", view.Find("[data-testid=share-id-kit]").TextContent);
        Assert.Equal("5 travel — Everyone who works travel claims is marked absent.", view.Find("[data-testid=left-travel]").TextContent.Trim());
        Assert.Equal(2, view.FindAll("[data-testid=plan-cases] tbody tr").Count);
    }

    [Fact]
    public void Move_bar_needs_a_target_and_a_reason_and_sends_pool_as_no_person()
    {
        var sent = new List<MoveRequest>();
        var bar = Ctx.Render<MoveBar>(p => p.Add(x => x.Count, 2).Add(x => x.Targets, [Ines, Kit])
            .Add(x => x.Move, (MoveRequest m) => { sent.Add(m); return Task.FromResult(true); }));
        bar.Find("form").Submit();
        Assert.Equal("Choose where the cases go.", bar.Find("[data-testid=move-problem]").TextContent);
        bar.Find("#move-target").Change(MoveBar.Pool);
        bar.Find("form").Submit();
        Assert.StartsWith("Give a reason", bar.Find("[data-testid=move-problem]").TextContent);
        bar.Find("#move-reason").Change("  leave  ");
        bar.Find("form").Submit();
        Assert.Equal([new MoveRequest(null, "leave")], sent);
        Assert.True(bar.Find("option[value=id-kit]").HasAttribute("disabled"));
        Assert.False(bar.Find("option[value=id-ines]").HasAttribute("disabled"));
    }

    [Fact]
    public void Case_picker_ticks_one_or_all_shown()
    {
        var rows = new[] { 1, 2, 3 }.Select(i => new TeamCaseRow(i, Guid.NewGuid(), $"C-{i}", "motor", 50 + i, 1000, new DateTime(2027, 3, 20), CaseStatus.Assigned, "INES")).ToList();
        var selected = new HashSet<int>();
        var picker = Ctx.Render<CasePicker>(p => p.Add(x => x.Rows, rows).Add(x => x.Selected, selected).Add(x => x.CanPick, true));
        picker.Find("[data-testid=case-C-2] [data-testid=pick]").Change(true);
        Assert.Equal([2], selected);
        picker.Find("[data-testid=pick-all]").Change(true);
        Assert.Equal([1, 2, 3], selected.Order());
        var readOnly = Ctx.Render<CasePicker>(p => p.Add(x => x.Rows, rows).Add(x => x.Selected, new HashSet<int>()).Add(x => x.CanPick, false));
        Assert.Empty(readOnly.FindAll("[data-testid=pick]"));
    }
}
