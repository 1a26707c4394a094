using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Export;

/// <summary>One store after a first start on the tiny seed: model v1 and its closed demo-history cases, with real snapshots.</summary>
public sealed class ExportStore : IAsyncLifetime
{
    public static readonly Actor Analyst = new("id-olu", "olu.berg", new HashSet<string> { Roles.Analyst });
    // Half the claims below the threshold join the audit sample, so the demo history holds some for sure.
    public const double AuditShare = 0.5;
    public TestStore Store { get; } = TestStore.Create(extra: new() { ["Queue:AuditShare"] = "0.5" });

    public async Task InitializeAsync()
    {
        Store.WriteSeed(historyRows: 600, openRows: 20);
        await Store.Host.Services.InitialiseStoreAsync();
    }

    public Task DisposeAsync() => Store.DisposeAsync().AsTask();

    public OutcomeExportService Service() => Store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<OutcomeExportService>();

    public async Task<byte[]> ExportAsync(ExportFilter filter, ExportFormat format, Actor? actor = null)
    {
        var export = await Service().PrepareAsync(actor ?? Analyst, filter, default);
        using var to = new MemoryStream();
        await export.WriteAsync(format, to, default);
        return to.ToArray();
    }

    /// <summary>Closed cases with their current verdict, straight from the store.</summary>
    public async Task<List<(Case Case, Verdict Verdict)>> ClosedAsync()
    {
        await using var db = Store.NewContext();
        var cases = await db.Cases.AsNoTracking().Where(c => c.Status == CaseStatus.Closed).Include(c => c.Verdicts).ToListAsync();
        return [.. cases.Select(c => (c, c.CurrentVerdict!))];
    }
}
