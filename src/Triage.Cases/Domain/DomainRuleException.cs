namespace Triage.Cases.Domain;

/// <summary>A business rule refused the requested change; the message says which rule and why.</summary>
public sealed class DomainRuleException(string message) : InvalidOperationException(message);

/// <summary>Someone else saved the same case after it was loaded; the caller must reload and retry.</summary>
public sealed class StaleCaseException(string message, Exception inner) : InvalidOperationException(message, inner);
