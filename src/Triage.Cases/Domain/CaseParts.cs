namespace Triage.Cases.Domain;

/// <summary>One driver as the model explained it when the case was scored; never recomputed.</summary>
public sealed class DriverSnapshot
{
    private DriverSnapshot() { }

    public DriverSnapshot(int rank, string field, string displayName, string valueText, double contribution, double effectPoints, string comparison)
    {
        Rank = rank;
        Field = field;
        DisplayName = displayName;
        ValueText = valueText;
        Contribution = contribution;
        EffectPoints = effectPoints;
        Comparison = comparison;
    }

    public int Id { get; private set; }
    public int CaseId { get; private set; }
    /// <summary>1 = largest contribution (most raising); the order the explainer returned.</summary>
    public int Rank { get; private set; }
    public string Field { get; private set; } = "";
    public string DisplayName { get; private set; } = "";
    public string ValueText { get; private set; } = "";
    /// <summary>Log-odds contribution.</summary>
    public double Contribution { get; private set; }
    public double EffectPoints { get; private set; }
    public string Comparison { get; private set; } = "";
    public bool Raises => Contribution > 0;
}

/// <summary>A suggested check, copied from the playbook when the case opened.</summary>
public sealed class CheckItem
{
    private CheckItem() { }

    public CheckItem(string driverField, int order, string title, string detail, string? basis)
    {
        DriverField = driverField;
        Order = order;
        Title = title;
        Detail = detail;
        Basis = basis;
    }

    public int Id { get; private set; }
    public int CaseId { get; private set; }
    public string DriverField { get; private set; } = "";
    public int Order { get; private set; }
    public string Title { get; private set; } = "";
    public string Detail { get; private set; } = "";
    public string? Basis { get; private set; }
    public string? DoneBy { get; private set; }
    public DateTime? DoneAt { get; private set; }
    public string? Note { get; private set; }
    public bool IsDone => DoneAt is not null;

    internal void MarkDone(string by, DateTime at, string? note)
    {
        DoneBy = by;
        DoneAt = at;
        Note = note;
    }

    internal void Reopen()
    {
        DoneBy = null;
        DoneAt = null;
    }
}

public sealed class CaseNote
{
    private CaseNote() { }

    internal CaseNote(string text, string by, DateTime at)
    {
        Text = text;
        By = by;
        At = at;
    }

    public int Id { get; private set; }
    public int CaseId { get; private set; }
    public string Text { get; private set; } = "";
    public string By { get; private set; } = "";
    public DateTime At { get; private set; }
}

/// <summary>Who held the case from when; the full chain survives reassignments. No <see cref="ToUserId"/> means back to the pool.</summary>
public sealed class Assignment
{
    private Assignment() { }

    internal Assignment(string? fromUserId, string? toUserId, string by, DateTime at, string? reason)
    {
        FromUserId = fromUserId;
        ToUserId = toUserId;
        By = by;
        At = at;
        Reason = reason;
    }

    public int Id { get; private set; }
    public int CaseId { get; private set; }
    public string? FromUserId { get; private set; }
    public string? ToUserId { get; private set; }
    public string By { get; private set; } = "";
    public DateTime At { get; private set; }
    public string? Reason { get; private set; }
}

/// <summary>An entry in the audit trail: who did what, when, and to which case (if any).</summary>
public sealed class AuditEvent
{
    private AuditEvent() { }

    public AuditEvent(string who, string what, string? detail, DateTime at, int? caseId = null)
    {
        Who = who;
        What = what;
        Detail = detail;
        At = Claim.Utc(at);
        CaseId = caseId;
    }

    public long Id { get; private set; }
    public int? CaseId { get; private set; }
    public string Who { get; private set; } = "";
    public string What { get; private set; } = "";
    public string? Detail { get; private set; }
    public DateTime At { get; private set; }
}
