namespace Triage.Cli.Demo;

internal sealed record PlaybookCheck(string Title, string Detail);

/// <summary>Optional test on the field's value; <see cref="Value"/> is a number, a string or a list of strings.</summary>
internal sealed record PlaybookCondition(string Op, object Value);

internal sealed record PlaybookRule(string Field, string Direction, PlaybookCondition? Condition, IReadOnlyList<PlaybookCheck> Checks, string Basis);

internal sealed record PlaybookFile(IReadOnlyList<PlaybookRule> Rules);

/// <summary>
/// The checks shipped with the demo: what an investigator looks at when a field pushes a claim's
/// risk up. Written from general claims-investigation practice, not from any source, hence the basis
/// "common practice". The branch office and the day of month cover began get no rule: they carry no risk.
/// </summary>
internal static class Playbook
{
    private const string Basis = "common practice";

    public static PlaybookFile Build() => new(
    [
        Rule("days_policy_start_to_loss", new("lte", 60),
            ("Confirm how the policy was bought", "Check the sales channel, the date and time of purchase and who paid the first premium."),
            ("Ask the previous insurer for the claims history", "A policy taken out just before a loss may follow a refusal or a cancellation elsewhere."),
            ("Look for evidence the damage predates cover", "Compare photos, invoices and repair estimates with the policy start date.")),
        Rule("cover_raised_days_before_loss", new("lte", 60),
            ("Find out why cover was raised", "Read the change request and any call notes; ask the claimant what prompted it."),
            ("Verify the items or value added", "Ask for receipts or valuations dated before the change of cover."),
            ("Compare the claim with the new cover", "Note whether the amount claimed only fits inside the raised limit.")),
        Rule("days_loss_to_report", new("gt", 14),
            ("Ask why the claim came in late", "Record the claimant's reason and check it against dates they give elsewhere."),
            ("Check that the loss date is consistent", "Compare it with third-party records such as repair bookings, bank statements or travel documents."),
            ("Check whether evidence is still available", "A late report often means the damaged item or the scene can no longer be inspected.")),
        Rule("police_report", new("eq", "no"),
            ("Ask why no police report was made", "A theft or burglary is normally reported; note the claimant's explanation."),
            ("Request a crime reference now", "Ask the claimant to report the loss and supply the reference; check it with the police force named."),
            ("Check for forced entry or other physical evidence", "Ask for photos of the damage, a locksmith's or glazier's invoice, or arrange an inspection.")),
        Rule("repairer_code", null,
            ("Review the repairer's recent claims", "Look at how many claims name this repairer and how many of them were queried."),
            ("Get an independent estimate", "Ask an approved assessor to inspect the damage and price the repair."),
            ("Check links between repairer and claimant", "Look for shared addresses, phone numbers or bank accounts.")),
        Rule("prior_claims_3y", new("gte", 3),
            ("Read the earlier claims", "Look for repeated causes, the same items claimed twice or the same third parties."),
            ("Check claims at other insurers", "Use the industry claims register where the law allows it."),
            ("Compare the stories", "Note changes in how the claimant describes similar events.")),
        Rule("address_changed_days_before_loss", new("lte", 90),
            ("Confirm the claimant lives at the new address", "Check electoral, utility or council records rather than documents the claimant supplies."),
            ("Ask why the address changed", "A move just before a loss may hide a previous address with a poor claims record."),
            ("Check where the loss happened", "Make sure the insured items or vehicle were at the address the policy covers.")),
        Rule("amount_to_limit_ratio", new("gt", 0.8),
            ("Ask for an itemised breakdown", "Each item with its value, age and proof of ownership."),
            ("Check values against market prices", "Price the items or the repair independently."),
            ("Look for items claimed twice", "Compare with earlier claims and with anything already paid by another insurer.")),
        Rule("claimed_amount", null,
            ("Check the amount against the damage described", "An amount out of proportion to the story is worth a closer look."),
            ("Ask for proof of ownership and value", "Receipts, bank statements, photos showing the items.")),
        Rule("loss_hour", new("lte", 4),
            ("Ask who can confirm the time", "Witnesses, phone records or security footage for the hour the claimant gives."),
            ("Check the claimant's account of their movements", "Compare the story with where the claimant says they were at that hour.")),
        Rule("vehicle_age_years", new("gte", 12),
            ("Check the vehicle's value before the loss", "Compare the claim with the market value of a vehicle of that age and mileage."),
            ("Look at the vehicle's recent history", "Check for a recent purchase, a failed inspection or the vehicle being offered for sale.")),
        Rule("loss_cause", new("in", new[] { "theft", "burglary", "fire" }),
            ("Visit or inspect the scene", "Fire and theft claims leave physical traces an inspection can confirm."),
            ("Check the claimant's finances where the law allows", "Money trouble is a common motive in staged theft and fire.")),
        Rule("line", null,
            ("Apply the line's own checklist", "Motor, home and travel losses each call for their own documents; make sure they are all on file."),
            ("Compare with similar claims in the line", "Look at the usual amounts and causes for this line before deciding what is unusual.")),
    ]);

    private static PlaybookRule Rule(string field, PlaybookCondition? condition, params (string Title, string Detail)[] checks) =>
        new(field, "raises", condition, [.. checks.Select(c => new PlaybookCheck(c.Title, c.Detail))], Basis);
}
