namespace Triage.Cli.Demo;

/// <summary>
/// A planted fraud pattern: when its trigger holds for a claim, the claim's fraud log-odds rise by
/// <see cref="Effect"/>. Each pattern reads exactly one model field, so an explainer should name that field.
/// </summary>
internal sealed record Mechanism(string Id, string Field, string Trigger, double Effect, Func<DemoClaim, bool> Fires);

internal static class Mechanisms
{
    /// <summary>Log-odds of fraud for a claim where nothing fired (sigmoid(-5.5) ≈ 0.41%).</summary>
    public const double BaseLogOdds = -5.5;

    /// <summary>Standard deviation of the per-claim Gaussian noise added to the log-odds.</summary>
    public const double NoiseSd = 0.3;

    public static readonly string[] HotspotRepairers = ["RP-07", "RP-23"];

    public static readonly IReadOnlyList<Mechanism> All =
    [
        new("early_loss", "days_policy_start_to_loss", "days_policy_start_to_loss < 30", 3.4,
            c => c.DaysStartToLoss < 30),
        new("cover_raised", "cover_raised_days_before_loss", "cover_raised_days_before_loss < 30", 3.4,
            c => c.CoverRaisedDays < 30),
        new("late_report", "days_loss_to_report", "days_loss_to_report > 30", 3.0,
            c => c.DaysLossToReport > 30),
        new("theft_no_police", "police_report", "loss_cause is theft or burglary and police_report = no", 3.4,
            c => c.Cause is "theft" or "burglary" && c.PoliceReport == false),
        new("repairer_hotspot", "repairer_code", "repairer_code is RP-07 or RP-23", 3.2,
            c => c.Repairer is not null && HotspotRepairers.Contains(c.Repairer)),
        new("prior_claims", "prior_claims_3y", "prior_claims_3y >= 3", 3.0,
            c => c.PriorClaims >= 3),
        new("address_change", "address_changed_days_before_loss", "address_changed_days_before_loss < 60", 3.0,
            c => c.AddressChangedDays < 60),
        new("near_limit", "amount_to_limit_ratio", "amount_to_limit_ratio > 0.9", 3.4,
            c => c.AmountToLimit > 0.9),
        new("night_loss", "loss_hour", "loss_hour is 0 to 4", 2.8,
            c => c.LossHour is >= 0 and <= 4),
        new("old_vehicle", "vehicle_age_years", "vehicle_age_years >= 15 (motor only)", 2.8,
            c => c.VehicleAge >= 15),
    ];
}
