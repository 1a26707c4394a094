using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Queue;

public sealed class QueueTests : IAsyncLifetime
{
    private readonly TestStore _store = TestStore.Create();
    private readonly TriageUser _ines = Build.User("ines", "motor,home");
    private readonly TriageUser _tomas = Build.User("tomas", "travel");
    private readonly List<Case> _cases = [];

    public async Task InitializeAsync()
    {
        await using var db = await _store.MigratedAsync();
        db.Users.AddRange(_ines, _tomas);
        var lines = new[] { "motor", "home", "travel" };
        for (var i = 0; i < 30; i++)
        {
            var line = lines[i % 3];
            var c = Build.Case(probability: 0.31 + (i * 7 % 30) / 50.0, line: line, amount: 1000 + i * 100);
            if (i % 4 == 0) c.AssignTo(line == "travel" ? _tomas : _ines, Actor.System, Build.Now);
            _cases.Add(c);
        }
        var closed = _cases[1];
        closed.AssignTo(_ines, Actor.System, Build.Now);
        closed.StartReview(Build.As(_ines), Build.Now);
        closed.RecordVerdict(VerdictOutcome.NotFraud, "Checks out", null, null, Build.As(_ines), Build.Now);
        db.Cases.AddRange(_cases);
        await db.SaveChangesAsync();
    }

    public async Task DisposeAsync() => await _store.DisposeAsync();

    private static readonly Actor Lead = new("id-lead", "lead", new HashSet<string> { Roles.TeamLead });
    private Actor Ines => new(_ines.Id, _ines.UserName!, new HashSet<string> { Roles.Investigator });

    private async Task<QueuePage> Page(QueueQuery q, Actor? actor = null)
    {
        await using var db = _store.NewContext();
        return await new QueueService(db).GetPageAsync(actor ?? Lead, q);
    }

    [Fact]
    public async Task All_open_comes_riskiest_first_without_closed_cases()
    {
        var page = await Page(new QueueQuery(PageSize: 100));
        var open = _cases.Where(c => c.IsOpen).OrderByDescending(c => c.Probability).ThenByDescending(c => c.Id).ToList();
        Assert.Equal(29, page.Total);
        Assert.Equal(open.Select(c => c.Id), page.Rows.Select(r => r.CaseId));
        Assert.Equal(open[0].TopDriver1, page.Rows[0].TopDriver1);
    }

    [Fact]
    public async Task Mine_unassigned_and_line_filter_narrow_the_queue()
    {
        var mine = await Page(new QueueQuery(QueueView.Mine), Ines);
        Assert.Equal(_cases.Count(c => c.IsOpen && c.AssigneeId == _ines.Id), mine.Total);
        Assert.All(mine.Rows, r => Assert.Equal("INES", r.AssigneeName));

        var unassigned = await Page(new QueueQuery(QueueView.Unassigned, Line: "home"));
        Assert.Equal(_cases.Count(c => c.IsOpen && c.AssigneeId == null && c.Line == "home"), unassigned.Total);
        Assert.All(unassigned.Rows, r => { Assert.Equal("home", r.Line); Assert.Null(r.AssigneeName); });

        var mineMotor = await Page(new QueueQuery(QueueView.Mine, "motor"), Ines);
        Assert.All(mineMotor.Rows, r => Assert.Equal("motor", r.Line));
        Assert.True(mineMotor.Total < mine.Total);
    }

    [Fact]
    public async Task Pages_are_disjoint_and_cover_the_queue()
    {
        var pages = new List<QueueRow>();
        for (var p = 0; p < 3; p++) pages.AddRange((await Page(new QueueQuery(Page: p, PageSize: 10))).Rows);
        Assert.Equal(29, pages.Count);
        Assert.Equal(29, pages.Select(r => r.CaseId).Distinct().Count());
        Assert.Equal(pages.OrderByDescending(r => r.Probability).Select(r => r.Probability), pages.Select(r => r.Probability));
    }

    [Fact]
    public async Task Sorts_by_amount_and_received_date_too()
    {
        var byAmount = await Page(new QueueQuery(Sort: QueueSort.Amount, Descending: false, PageSize: 100));
        Assert.Equal(byAmount.Rows.Select(r => r.ClaimedAmount).Order(), byAmount.Rows.Select(r => r.ClaimedAmount));
        var byReceived = await Page(new QueueQuery(Sort: QueueSort.Received, PageSize: 100));
        Assert.Equal(byReceived.Rows.Select(r => r.ReceivedDate).OrderDescending(), byReceived.Rows.Select(r => r.ReceivedDate));
        var byDue = await Page(new QueueQuery(Sort: QueueSort.DueDate, Descending: false, PageSize: 100));
        Assert.Equal(byDue.Rows.Select(r => r.DueDate).Order(), byDue.Rows.Select(r => r.DueDate));
    }

    [Theory]
    [InlineData(QueueView.Mine, "motor", "IX_Cases_Open_Assignee_Line_Probability")]
    [InlineData(QueueView.Mine, null, "IX_Cases_Open_Assignee_Probability")]
    [InlineData(QueueView.Unassigned, "home", "IX_Cases_Open_Assignee_Line_Probability")]
    [InlineData(QueueView.AllOpen, "travel", "IX_Cases_Open_Line_Probability")]
    [InlineData(QueueView.AllOpen, null, "IX_Cases_Open_Probability")]
    public async Task The_riskiest_first_page_reads_a_partial_index_without_sorting(QueueView view, string? line, string index)
    {
        var plan = await PlanAsync(view == QueueView.AllOpen ? Lead : Ines, new QueueQuery(view, line));
        Assert.Contains(plan, step => step.Contains(index));
        Assert.DoesNotContain(plan, step => step.Contains("TEMP B-TREE"));
    }

    [Theory]
    [InlineData(QueueSort.DueDate, false, "IX_Cases_Open_DueDate")]
    [InlineData(QueueSort.Amount, true, "IX_Cases_Open_ClaimedAmount")]
    [InlineData(QueueSort.Received, false, "IX_Cases_Open_ReceivedDate")]
    public async Task Other_sorts_of_the_whole_queue_read_their_own_partial_index(QueueSort sort, bool descending, string index)
    {
        var plan = await PlanAsync(Lead, new QueueQuery(Sort: sort, Descending: descending));
        Assert.Contains(plan, step => step.Contains(index));
        Assert.DoesNotContain(plan, step => step.Contains("TEMP B-TREE"));
    }

    [Fact]
    public async Task Claim_number_search_reads_the_claim_number_index()
    {
        var plan = await PlanAsync(Lead, new QueueQuery(ClaimNumber: "t-0001"));
        Assert.Contains(plan, step => step.Contains("IX_Cases_Open_ClaimNumber"));
    }

    private async Task<List<string>> PlanAsync(Actor actor, QueueQuery q)
    {
        await using var db = _store.NewContext();
        var sql = new QueueService(db).PageSql(actor, q);
        var connection = db.Database.GetDbConnection();
        await connection.OpenAsync();
        await using var explain = connection.CreateCommand();
        // ToQueryString prints parameters as ".param set" lines; bind them instead.
        var lines = sql.Split('\n');
        explain.CommandText = "EXPLAIN QUERY PLAN " + string.Join('\n', lines.Where(l => !l.StartsWith(".param")));
        foreach (var p in lines.Where(l => l.StartsWith(".param set ")).Select(l => l[11..].Split(' ', 2)))
        {
            var parameter = explain.CreateParameter();
            parameter.ParameterName = p[0];
            parameter.Value = p[1].Trim('\'');
            explain.Parameters.Add(parameter);
        }
        var plan = new List<string>();
        await using (var r = await explain.ExecuteReaderAsync())
            while (await r.ReadAsync()) plan.Add(r.GetString(3));
        return plan;
    }

    [Fact]
    public void Age_and_due_state_count_calendar_days()
    {
        var row = new QueueRow(1, "C", "motor", 1, 0.5, 50, null, null, new DateTime(2027, 3, 1), new DateTime(2027, 3, 11), CaseStatus.New, null);
        Assert.Equal(14, row.AgeDays(new DateTime(2027, 3, 15)));
        Assert.Equal(DueState.Overdue, row.Due(new DateTime(2027, 3, 12)));
        Assert.Equal(DueState.DueSoon, row.Due(new DateTime(2027, 3, 9)));
        Assert.Equal(DueState.OnTime, row.Due(new DateTime(2027, 3, 8)));
    }
}
