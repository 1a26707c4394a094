using System.Text.Json;
using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Metadata.Builders;
using Triage.Cases.Domain;
using Triage.Scoring.Explaining;

namespace Triage.Cases.Intake;

/// <summary>
/// The score a claim got on arrival, whether or not it became a case: the model version, probability,
/// log-odds and every field's log-odds contribution as explained then (never recomputed).
/// </summary>
public sealed class ClaimScore
{
    private ClaimScore() { }

    public long Id { get; private set; }
    public int ClaimId { get; private set; }
    public Claim? Claim { get; private set; }
    public string ModelVersion { get; private set; } = "";
    public double Probability { get; private set; }
    public int RiskScore { get; private set; }
    public double LogOdds { get; private set; }
    public double BaseLogOdds { get; private set; }
    /// <summary>At or above the queue threshold, so a case was opened.</summary>
    public bool Queued { get; private set; }
    public DateTime ScoredAt { get; private set; }
    /// <summary>Field name → log-odds contribution, strongest raising first.</summary>
    public string DriversJson { get; private set; } = "{}";

    /// <summary>For a claim already stored (it has an id) the id is used; otherwise the claim is saved with the score.</summary>
    public static ClaimScore Record(Claim claim, Explanation explanation, string modelVersion, bool queued, DateTime at) => new()
    {
        ClaimId = claim.Id,
        Claim = claim.Id == 0 ? claim : null,
        ModelVersion = modelVersion,
        Probability = explanation.Probability,
        RiskScore = (int)Math.Round(explanation.Probability * 100, MidpointRounding.AwayFromZero),
        LogOdds = explanation.LogOdds,
        BaseLogOdds = explanation.BaseValue,
        Queued = queued,
        ScoredAt = Domain.Claim.Utc(at),
        DriversJson = JsonSerializer.Serialize(explanation.Drivers.ToDictionary(d => d.Field, d => d.Contribution)),
    };

    public IReadOnlyDictionary<string, double> Drivers() => JsonSerializer.Deserialize<Dictionary<string, double>>(DriversJson) ?? [];
}

internal sealed class ClaimScoreConfiguration : IEntityTypeConfiguration<ClaimScore>
{
    public void Configure(EntityTypeBuilder<ClaimScore> s)
    {
        s.HasOne(x => x.Claim).WithMany().HasForeignKey(x => x.ClaimId);
        s.HasIndex(x => x.ClaimId);
        s.Property(x => x.ModelVersion).HasMaxLength(64);
    }
}
