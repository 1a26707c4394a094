using Bunit;
using MudBlazor.Services;

namespace Triage.Web.Tests.Cases;

/// <summary>A bUnit context with MudBlazor; disposed asynchronously, as MudBlazor's services need under xunit v2.</summary>
public abstract class ComponentTest : IAsyncLifetime
{
    protected BunitContext Ctx { get; } = new();

    protected ComponentTest()
    {
        Ctx.JSInterop.Mode = JSRuntimeMode.Loose;
        Ctx.Services.AddMudServices();
    }

    public Task InitializeAsync() => Task.CompletedTask;

    public async Task DisposeAsync() => await Ctx.DisposeAsync();
}
