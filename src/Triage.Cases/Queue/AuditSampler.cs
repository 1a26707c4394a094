using Microsoft.Extensions.Options;
using Triage.Cases.Domain;
using Triage.Cases.Options;

namespace Triage.Cases.Queue;

/// <summary>
/// Decides whether a scored claim becomes a case: always at or above the threshold, otherwise with
/// probability <see cref="QueueOptions.AuditShare"/>, drawn independently per claim.
/// </summary>
public sealed class AuditSampler(IOptions<QueueOptions> queue, Random random)
{
    private readonly Lock _gate = new();

    public AuditSampler(IOptions<QueueOptions> queue) : this(queue, Random.Shared) { }

    public double Threshold => queue.Value.Threshold;

    /// <summary>The case's selection, or null when the claim is stored as scored and not queued.</summary>
    public CaseSelection? Decide(double probability)
    {
        var o = queue.Value;
        if (probability >= o.Threshold) return CaseSelection.ByThreshold;
        if (o.AuditShare <= 0) return null;
        double draw;
        lock (_gate) draw = random.NextDouble(); // a seeded Random is not thread-safe
        return draw < o.AuditShare ? CaseSelection.Audit(o.AuditShare) : null;
    }
}
