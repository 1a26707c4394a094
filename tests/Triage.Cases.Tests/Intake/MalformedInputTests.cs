using Triage.Cases.Intake;

namespace Triage.Cases.Tests.Intake;

/// <summary>Every malformed input is refused whole: a clear error naming row and column, and the store unchanged.</summary>
public sealed class SqliteMalformedInputTests(IntakeFixture fixture) : MalformedInputTests(fixture), IClassFixture<IntakeFixture>;

public sealed class PostgresMalformedInputTests(PostgresIntakeFixture fixture) : MalformedInputTests(fixture), IClassFixture<PostgresIntakeFixture>;

public abstract class MalformedInputTests(IntakeFixture fixture)
{
    [Fact]
    public void The_corpus_holds_at_least_fifty_inputs() => Assert.True(MalformedCorpus.Inputs.Count >= 50, $"{MalformedCorpus.Inputs.Count} inputs");

    [SkippableTheory]
    [MemberData(nameof(MalformedCorpus.Names), MemberType = typeof(MalformedCorpus))]
    public async Task Is_rejected_with_row_and_column_and_nothing_stored(string name)
    {
        var input = MalformedCorpus.Inputs[name];
        var before = await fixture.FingerprintAsync();
        var rejections = await fixture.AuditCountAsync("claims.rejected");

        var report = await fixture.ImportAsync(IntakeFixture.Source(input.Body, input.Format, input.Delimiter, input.MaxRows));

        Assert.True(report.Rejected, $"{name}: accepted ({report.Summary})");
        Assert.Equal(0, report.Stored);
        var all = string.Join("\n", report.Errors);
        var match = report.Errors.FirstOrDefault(e => e.Row == input.Row && e.Column == input.Column
                                                      && e.Problem.Contains(input.Fragment, StringComparison.OrdinalIgnoreCase));
        Assert.True(match is not null, $"{name}: expected row {input.Row}, column {input.Column ?? "(none)"}, '{input.Fragment}'; got:\n{all}");
        var text = match.ToString();
        Assert.Contains(input.Row == 0 ? "file" : $"row {input.Row}", text);
        if (input.Column is not null) Assert.Contains($"column '{input.Column}'", text);
        Assert.Equal(before, await fixture.FingerprintAsync());
        Assert.Equal(rejections + 1, await fixture.AuditCountAsync("claims.rejected"));
    }
}
