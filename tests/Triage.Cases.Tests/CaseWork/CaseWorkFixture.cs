using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.CaseFile;
using Triage.Cases.CaseWork;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.CaseWork;

/// <summary>A fresh store with three people and one case; each call runs in its own scope, as a page's would.</summary>
public sealed class CaseWorkFixture(string provider = "Sqlite") : IAsyncDisposable
{
    public TestStore Store { get; } = TestStore.Create(provider);
    public TriageUser Ines { get; } = Build.User("ines");
    public TriageUser Tomas { get; } = Build.User("tomas");
    public TriageUser Mara { get; } = Build.User("mara");
    public List<CaseChanged> Published { get; } = [];
    private IDisposable? _subscription;

    public Actor InesActor => As(Ines, Roles.Investigator);
    public Actor TomasActor => As(Tomas, Roles.Investigator);
    public Actor Lead => As(Mara, Roles.TeamLead);

    public static Actor As(TriageUser u, params string[] roles) => new(u.Id, u.UserName!, roles.ToHashSet());

    /// <summary>Adds a case, assigned to <paramref name="assignee"/> when given.</summary>
    public async Task<int> CaseAsync(TriageUser? assignee = null)
    {
        await using var db = await Store.MigratedAsync();
        if (!await db.Users.AnyAsync())
        {
            db.Users.AddRange(Ines, Tomas, Mara);
            await db.SaveChangesAsync();
        }
        var c = Build.Case();
        if (assignee is not null) c.AssignTo(await db.Users.SingleAsync(u => u.Id == assignee.Id), Actor.System, Build.Now);
        db.Cases.Add(c);
        await db.SaveChangesAsync();
        _subscription ??= Store.Host.Services.GetRequiredService<CaseEvents>().Subscribe(e => { lock (Published) Published.Add(e); });
        return c.Id;
    }

    public async Task<T> WorkAsync<T>(Func<CaseWorkService, Task<T>> call)
    {
        await using var scope = Store.Host.Services.CreateAsyncScope();
        return await call(scope.ServiceProvider.GetRequiredService<CaseWorkService>());
    }

    public Task WorkAsync(Func<CaseWorkService, Task> call) => WorkAsync(async s => { await call(s); return 0; });

    public Task<CaseFileView> OpenAsync(int id, Actor by) => WorkAsync(s => s.OpenAsync(id, by));

    public async Task<Case> LoadAsync(int id)
    {
        await using var db = Store.NewContext();
        return await db.Cases.AsSplitQuery().Include(c => c.Checks).Include(c => c.Verdicts).Include(c => c.Notes).Include(c => c.Audit)
            .Include(c => c.Claim).SingleAsync(c => c.Id == id);
    }

    public async ValueTask DisposeAsync()
    {
        _subscription?.Dispose();
        await Store.DisposeAsync();
    }
}
