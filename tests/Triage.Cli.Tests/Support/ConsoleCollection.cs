namespace Triage.Cli.Tests.Support;

/// <summary>
/// Commands write to the process-wide Console, and some tests capture it: tests that run commands
/// share this collection so they never run at the same time.
/// </summary>
[CollectionDefinition(Name)]
public sealed class ConsoleCollection
{
    public const string Name = "Console";
}
