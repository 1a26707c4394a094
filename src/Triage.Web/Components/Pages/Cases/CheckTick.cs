namespace Triage.Web.Components.Pages.Cases;

public sealed record CheckTick(int CheckId, string? Note);
