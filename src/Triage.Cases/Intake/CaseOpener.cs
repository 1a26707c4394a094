using System.Globalization;
using Triage.Cases.Domain;
using Triage.Scoring.Explaining;
using Triage.Scoring.Features;
using Triage.Scoring.Models;

namespace Triage.Cases.Intake;

/// <summary>A claim with the model's explanation and the feature values it was explained on.</summary>
public sealed record ScoredClaim(Claim Claim, IReadOnlyDictionary<string, string?> FeatureValues, Explanation Explanation);

/// <summary>Scores claims with a model and opens cases with the playbook's checks.</summary>
public static class CaseOpener
{
    /// <summary>Explains every claim in parallel (the model is thread-safe); the result keeps the input order.</summary>
    public static IReadOnlyList<ScoredClaim> Score(ScoringModel model, IEnumerable<(Claim Claim, IReadOnlyDictionary<string, string?> Values)> claims, CancellationToken ct) =>
        claims.AsParallel().AsOrdered().WithCancellation(ct)
            .Select(c => new ScoredClaim(c.Claim, FeatureValues(model, c.Values), model.Explain(c.Values)))
            .ToList();

    public static Case Open(ScoredClaim scored, string modelVersion, IReadOnlyList<PlaybookRule> playbook, DateTime at, int dueDays, Actor by,
        CaseSelection? selection = null)
    {
        var c = Case.Open(scored.Claim, scored.Explanation, modelVersion, scored.FeatureValues, [], at, dueDays, by, selection);
        c.Checks.AddRange(ChecksFor(c.Drivers, scored.FeatureValues, playbook));
        return c;
    }

    /// <summary>Checks from the rules matching the case's raising drivers, strongest driver first, each title once.</summary>
    public static IEnumerable<CheckItem> ChecksFor(IEnumerable<DriverSnapshot> drivers, IReadOnlyDictionary<string, string?> values, IReadOnlyList<PlaybookRule> playbook)
    {
        var seen = new HashSet<string>(StringComparer.OrdinalIgnoreCase);
        var order = 0;
        foreach (var driver in drivers.Where(d => d.Raises).OrderBy(d => d.Rank))
            foreach (var rule in playbook.Where(r => r.Direction == DriverDirection.Raises && r.Matches(driver, values)))
                foreach (var check in rule.Checks.Where(ch => seen.Add(ch.Title)))
                    yield return new CheckItem(driver.Field, ++order, check.Title, check.Detail, rule.Basis);
    }

    /// <summary>The model's inputs for one claim: feature fields as received, derived values as computed.</summary>
    public static IReadOnlyDictionary<string, string?> FeatureValues(ScoringModel model, IReadOnlyDictionary<string, string?> values)
    {
        var schema = model.Schema;
        var result = new Dictionary<string, string?>();
        foreach (var f in schema.Fields.Where(f => f.Feature)) result[f.Name] = ClaimValues.Raw(values, f.Name);
        foreach (var d in schema.Derived.Where(d => d.Feature))
        {
            var v = ClaimValues.Derive(d, values);
            result[d.Name] = double.IsNaN(v) ? null : v.ToString("R", CultureInfo.InvariantCulture);
        }
        return result;
    }
}
