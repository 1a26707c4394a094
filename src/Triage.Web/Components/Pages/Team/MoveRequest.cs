namespace Triage.Web.Components.Pages.Team;

/// <summary>Where the lead sends the selected cases: a person, or back to the pool when <see cref="ToUserId"/> is null.</summary>
public sealed record MoveRequest(string? ToUserId, string Reason);
