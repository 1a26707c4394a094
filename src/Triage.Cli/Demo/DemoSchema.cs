using Triage.Scoring.Schema;

namespace Triage.Cli.Demo;

/// <summary>The claim schema of the demo insurer, built in code so the generator and its columns cannot drift apart.</summary>
internal static class DemoSchema
{
    public static readonly string[] Lines = ["motor", "home", "travel"];

    public static readonly string[] Causes =
    [
        "collision", "theft", "vandalism", "windscreen", "fire", "water", "storm", "burglary",
        "accidental_damage", "baggage_loss", "medical", "cancellation",
    ];

    public static readonly string[] Repairers = [.. Enumerable.Range(1, 40).Select(i => $"RP-{i:00}")];

    public static readonly string[] BranchOffices =
        ["Ashford Vale", "Brindle Cross", "Corrow Bay", "Dunmere", "Elstow Reach", "Fenwick Hollow"];

    public static readonly string[] AgeBands = ["18-25", "26-35", "36-50", "51-65", "66+"];

    public static ClaimSchema Build() => new(
        "Larchmere Mutual claims",
        1,
        new SchemaRoles("claim_number", "line", "claimed_amount", "report_date", "loss_date", "policy_start_date", "claimant_name"),
        [
            new("claim_number", FieldType.Text, "Claim number", "Unique reference the claims system gives the claim.", Identifier: true),
            new("policy_number", FieldType.Text, "Policy number", "Policy the claim is made under.", Identifier: true),
            new("claimant_name", FieldType.Text, "Claimant", "Name of the policyholder making the claim.", Identifier: true),
            new("line", FieldType.Category, "Line of business", "Kind of policy the claim is made under.", Categories: Lines, Feature: true),
            new("loss_cause", FieldType.Category, "Cause of loss", "What the claimant says happened.", Categories: Causes, Feature: true),
            new("policy_start_date", FieldType.Date, "Policy start", "Date the current cover began."),
            new("loss_date", FieldType.Date, "Date of loss", "Date the claimant says the loss happened."),
            new("report_date", FieldType.Date, "Date reported", "Date the claim reached the insurer."),
            new("loss_hour", FieldType.Number, "Hour of loss",
                "Hour of the day (0-23) the loss is said to have happened; missing when unknown.",
                Unit: "h", Min: 0, Max: 23, MissingAllowed: true, Feature: true),
            new("claimed_amount", FieldType.Number, "Amount claimed", "Amount the claimant asks for.",
                Unit: "EUR", Min: 0, Max: 500000, Feature: true),
            new("policy_limit", FieldType.Number, "Policy limit", "Most the policy pays for one claim.",
                Unit: "EUR", Min: 100, Max: 1000000),
            new("cover_raised_days_before_loss", FieldType.Number, "Cover raised before loss",
                "Days between the last increase of cover and the loss; missing when cover was never raised.",
                Unit: "days", Min: 0, Max: 3650, MissingAllowed: true, Feature: true),
            new("address_changed_days_before_loss", FieldType.Number, "Address change before loss",
                "Days between the policyholder's last change of address and the loss; missing when the address never changed.",
                Unit: "days", Min: 0, Max: 3650, MissingAllowed: true, Feature: true),
            new("prior_claims_3y", FieldType.Number, "Prior claims (3 years)",
                "Claims the policyholder made in the three years before this one.", Min: 0, Max: 30, Feature: true),
            new("police_report", FieldType.YesNo, "Police report",
                "Whether a police report reference was supplied; missing when the loss does not call for one.",
                MissingAllowed: true, Feature: true),
            new("repairer_code", FieldType.Category, "Repairer", "Repairer or contractor named on the claim; missing when none.",
                Categories: Repairers, MissingAllowed: true, Feature: true),
            new("vehicle_age_years", FieldType.Number, "Vehicle age", "Age of the insured vehicle in years (motor only).",
                Unit: "years", Min: 0, Max: 40, MissingAllowed: true, Feature: true),
            new("branch_office", FieldType.Category, "Branch office", "Larchmere Mutual office that handles the policy.",
                Categories: BranchOffices, Feature: true),
            new("claimant_age_band", FieldType.Category, "Claimant age band",
                "Age band of the claimant. Protected: kept for fairness monitoring, never a model feature.",
                Categories: AgeBands, MissingAllowed: true, Protected: true),
        ],
        [
            new("days_policy_start_to_loss", DerivedKind.DaysBetween, ["policy_start_date", "loss_date"],
                "Days from policy start to loss", "Whole days between the start of cover and the loss.", Unit: "days"),
            new("days_loss_to_report", DerivedKind.DaysBetween, ["loss_date", "report_date"],
                "Days from loss to report", "Whole days between the loss and the claim reaching the insurer.", Unit: "days"),
            new("policy_start_day_of_month", DerivedKind.DayOfMonth, ["policy_start_date"],
                "Day of month cover began", "Day of the month (1-31) the cover began."),
            new("amount_to_limit_ratio", DerivedKind.Ratio, ["claimed_amount", "policy_limit"],
                "Amount as share of limit", "Amount claimed divided by the policy limit."),
        ]);
}
