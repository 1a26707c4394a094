using Triage.Cases.Domain;
using Triage.Cases.Queue;
using Triage.Cases.Tests.Support;
using Triage.Scoring.Explaining;

namespace Triage.Cases.Tests.Queue;

/// <summary>Filters and sorts over cases that differ in received date, due date, status and drivers.</summary>
public sealed class QueueFilterTests : IAsyncLifetime
{
    private static readonly Actor Manager = new("id-manager", "manager", new HashSet<string> { Roles.Manager });
    private readonly TestStore _store = TestStore.Create();
    private readonly TriageUser _ines = Build.User("ines", "motor,home,travel");
    private readonly List<Case> _cases = [];

    public async Task InitializeAsync()
    {
        await using var db = await _store.MigratedAsync();
        db.Users.Add(_ines);
        for (var i = 0; i < 24; i++)
        {
            var c = OpenCase(i);
            if (i % 3 == 0) c.AssignTo(_ines, Actor.System, Build.Now);
            if (i % 6 == 0) c.StartReview(new Actor(_ines.Id, "ines"), Build.Now);
            _cases.Add(c);
        }
        db.Cases.AddRange(_cases);
        await db.SaveChangesAsync();
    }

    public async Task DisposeAsync() => await _store.DisposeAsync();

    // Received one day apart; even cases are raised by the repairer, odd ones are lowered by it.
    private static Case OpenCase(int i)
    {
        var received = new DateTime(2027, 2, 1, 0, 0, 0, DateTimeKind.Utc).AddDays(i);
        var number = $"Q-{i:D3}-{Guid.NewGuid():N}"[..12].ToUpperInvariant();
        var claim = Claim.Receive(number, "motor", received, received.AddDays(-1), null, 1000 + i, new Dictionary<string, string?>());
        var repairer = i % 2 == 0 ? 0.5 : -0.5;
        var p = 0.3 + i / 100.0;
        var explanation = new Explanation(-1.5, Math.Log(p / (1 - p)), p,
        [
            new Driver("claimed_amount", "Amount claimed", "x", 0.8, 10, "above typical"),
            new Driver("repairer_code", "Repairer", "RP-01", repairer, repairer * 10, "often seen"),
        ]);
        return Case.Open(claim, explanation, "v-test", new Dictionary<string, string?>(), [], received, 5 + i % 4, Actor.System);
    }

    private async Task<QueuePage> Page(QueueQuery q)
    {
        await using var db = _store.NewContext();
        return await new QueueService(db).GetPageAsync(Manager, q);
    }

    [Fact]
    public async Task Driver_filter_keeps_cases_the_field_raised_not_those_it_lowered()
    {
        var page = await Page(new QueueQuery(DriverField: "repairer_code", PageSize: 100));
        Assert.Equal(12, page.Total);
        var even = _cases.Where((_, i) => i % 2 == 0).Select(c => c.Id).ToHashSet();
        Assert.All(page.Rows, r => Assert.Contains(r.CaseId, even));
        Assert.Equal(0, (await Page(new QueueQuery(DriverField: "police_report"))).Total);
    }

    [Fact]
    public async Task Received_range_includes_both_end_days()
    {
        var page = await Page(new QueueQuery(ReceivedFrom: new DateTime(2027, 2, 3), ReceivedTo: new DateTime(2027, 2, 7), PageSize: 100));
        Assert.Equal(5, page.Total);
        Assert.All(page.Rows, r => Assert.InRange(r.ReceivedDate, new DateTime(2027, 2, 3), new DateTime(2027, 2, 7, 23, 59, 59)));
    }

    [Fact]
    public async Task A_range_that_ends_before_it_starts_is_refused_with_both_dates()
    {
        var e = await Assert.ThrowsAsync<ArgumentException>(() =>
            Page(new QueueQuery(ReceivedFrom: new DateTime(2027, 2, 9), ReceivedTo: new DateTime(2027, 2, 3))));
        Assert.Contains("2027-02-09", e.Message);
        Assert.Contains("2027-02-03", e.Message);
    }

    [Fact]
    public async Task Status_filter_and_claim_number_search()
    {
        Assert.Equal(_cases.Count(c => c.Status == CaseStatus.InReview), (await Page(new QueueQuery(Status: CaseStatus.InReview))).Total);
        Assert.Equal(_cases.Count(c => c.Status == CaseStatus.New), (await Page(new QueueQuery(Status: CaseStatus.New))).Total);
        var target = _cases[7].ClaimNumber;
        var found = await Page(new QueueQuery(ClaimNumber: " " + target.ToLowerInvariant()[..8] + " "));
        Assert.Contains(found.Rows, r => r.ClaimNumber == target);
        Assert.All(found.Rows, r => Assert.StartsWith(target[..8], r.ClaimNumber));
    }

    [Theory]
    [InlineData(QueueSort.Received, false)]
    [InlineData(QueueSort.DueDate, false)]
    [InlineData(QueueSort.Amount, true)]
    public async Task Sorts_order_the_whole_queue_with_id_breaking_ties(QueueSort sort, bool descending)
    {
        var rows = (await Page(new QueueQuery(Sort: sort, Descending: descending, PageSize: 100))).Rows;
        Func<QueueRow, double> key = sort switch
        {
            QueueSort.Received => r => r.ReceivedDate.Ticks,
            QueueSort.DueDate => r => r.DueDate.Ticks,
            _ => r => r.ClaimedAmount,
        };
        var expected = descending ? rows.OrderByDescending(key).ThenByDescending(r => r.CaseId) : rows.OrderBy(key).ThenBy(r => r.CaseId);
        Assert.Equal(expected.Select(r => r.CaseId), rows.Select(r => r.CaseId));
        Assert.Equal(24, rows.Count);
    }
}
