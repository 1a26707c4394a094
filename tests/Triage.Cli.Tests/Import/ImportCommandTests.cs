using System.CommandLine;
using Microsoft.Extensions.Configuration;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Support;
using Triage.Cli.Tests.Support;
using Triage.Cli.ApiKeys;
using Triage.Cli.Import;

namespace Triage.Cli.Tests.Import;

/// <summary>The commands run in-process over a temp store seeded with the tiny scenario (a 20-tree model).</summary>
public sealed class ImportCommandTests() : TinyStoreCommandTest(300, 20)
{
    protected override IEnumerable<Command> Commands(Action<IConfigurationBuilder> configure) =>
        [ImportCommand.Create(configure), ApiKeysCommand.Create(configure)];

    private string Write(string name, string text)
    {
        var path = Path.Combine(Dir, name);
        File.WriteAllText(path, text);
        return path;
    }

    [Fact]
    public void Imports_a_file_then_reports_the_resend_as_duplicates()
    {
        var file = Write("claims.csv", IntakeRows.Csv(IntakeRows.Many(25, "CLI"), ';'));
        var first = Run("import", file, "--delimiter", ";");
        Assert.True(first.Exit == 0, first.Err);
        Assert.Contains("25 new claim(s) stored and scored", first.Out);
        // Not a terminal here, so progress comes as lines: each stage from its start to 100%.
        Assert.Contains("Checking claims.csv: 100% (25 rows)", first.Err);
        Assert.Contains("Storing claims.csv: 100% (25 rows)", first.Err);

        var again = Run("import", file, "--delimiter", ";");
        Assert.Equal(0, again.Exit);
        Assert.Contains("0 new claim(s) stored and scored, 0 queued as cases, 25 duplicate(s)", again.Out);
    }

    [Fact]
    public void A_bad_file_is_refused_naming_row_and_column()
    {
        var file = Write("bad.csv", IntakeRows.Edit(IntakeRows.Csv(IntakeRows.Many(4, "CLIBAD")), 2, "claimed_amount", "12,5"));
        var result = Run("import", file);
        Assert.Equal(1, result.Exit);
        Assert.Contains("rejected, nothing stored", result.Err);
        Assert.Contains("row 2", result.Err);
        Assert.Contains("header has 19", result.Err);
        Assert.Equal(1, Run("import", Path.Combine(Dir, "missing.csv")).Exit);
        Assert.Equal(2, Run("import", file, "--delimiter", ";;").Exit);
    }

    [Fact]
    public void Keys_are_created_listed_and_revoked()
    {
        var created = Run("api-keys", "create", "--name", "nightly feed");
        Assert.Equal(0, created.Exit);
        var secret = created.Out.Trim();
        Assert.StartsWith("trk_", secret);
        Assert.Contains("shown only now", created.Err);

        var listed = Run("api-keys", "list");
        Assert.Contains("nightly feed\tactive", listed.Out);
        Assert.DoesNotContain(secret, listed.Out);

        Assert.Equal(0, Run("api-keys", "revoke", secret[..12]).Exit);
        Assert.Contains("nightly feed\trevoked", Run("api-keys", "list").Out);
        var twice = Run("api-keys", "revoke", "1");
        Assert.Equal(1, twice.Exit);
        Assert.Contains("already revoked", twice.Err);
    }
}
