using Triage.Scoring.Schema;

namespace Triage.Scoring.Tests.Schema;

public sealed class ClaimSchemaTests
{
    private static string DemoSchemaPath()
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
            if (File.Exists(Path.Combine(dir.FullName, "Triage.sln")))
                return Path.Combine(dir.FullName, "seed-cases", "schema.json");
        throw new InvalidOperationException("Repository root not found.");
    }

    [Fact]
    public void Demo_schema_loads_and_keeps_its_protected_field_out_of_the_features()
    {
        var schema = ClaimSchema.Load(DemoSchemaPath());

        var ageBand = schema.Field("claimant_age_band");
        Assert.True(ageBand.Protected);
        Assert.DoesNotContain("claimant_age_band", schema.FeatureNames);
        Assert.Contains("days_policy_start_to_loss", schema.FeatureNames);
    }

    [Fact]
    public void A_protected_field_marked_as_feature_is_refused_by_name()
    {
        var schema = ClaimSchema.Load(DemoSchemaPath());
        var tampered = schema with
        {
            Fields = schema.Fields.Select(f => f.Name == "claimant_age_band" ? f with { Feature = true } : f).ToList(),
        };

        var error = Assert.Throws<ProtectedFieldException>(tampered.Validate);
        Assert.Equal("claimant_age_band", error.Field);
        Assert.Contains("claimant_age_band", error.Message);
    }

    [Fact]
    public void A_derived_value_reading_an_unknown_field_is_refused_with_its_names()
    {
        var schema = ClaimSchema.Load(DemoSchemaPath());
        var broken = schema with
        {
            Derived = [.. schema.Derived, new DerivedSpec("gap", DerivedKind.DaysBetween, ["loss_date", "no_such_date"], "Gap", "Test")],
        };

        var error = Assert.Throws<InvalidDataException>(broken.Validate);
        Assert.Contains("'gap'", error.Message);
        Assert.Contains("'no_such_date'", error.Message);
    }

    [Fact]
    public void Malformed_schema_file_names_the_file()
    {
        var path = Path.Combine(Path.GetTempPath(), $"schema-{Guid.NewGuid():N}.json");
        File.WriteAllText(path, "{ \"name\": ");
        try
        {
            var error = Assert.Throws<InvalidDataException>(() => ClaimSchema.Load(path));
            Assert.Contains(path, error.Message);
        }
        finally { File.Delete(path); }
    }
}
