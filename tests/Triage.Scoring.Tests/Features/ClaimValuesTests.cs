using System.Globalization;
using Triage.Scoring.Features;

namespace Triage.Scoring.Tests.Features;

public sealed class ClaimValuesTests
{
    /// <summary>Reference: .NET 10's DateOnly.TryParseExact with "yyyy-MM-dd" and the invariant culture.</summary>
    private static DateOnly? Reference(string v) =>
        DateOnly.TryParseExact(v.Trim(), "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var d) ? d : null;

    private static DateOnly? Read(string v)
    {
        try { return ClaimValues.Date(new Dictionary<string, string?> { ["d"] = v }, "d"); }
        catch (InvalidDataException) { return null; }
    }

    [Fact]
    public void Every_day_of_a_leap_span_reads_as_the_framework_reads_it()
    {
        for (var d = new DateOnly(1999, 12, 1); d <= new DateOnly(2029, 3, 31); d = d.AddDays(1))
        {
            var text = d.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
            Assert.Equal(d, Read(text));
        }
    }

    [Theory]
    [InlineData("2024-02-29")] [InlineData("2023-02-29")] [InlineData("2025-04-31")] [InlineData("2025-13-01")]
    [InlineData("2025-00-10")] [InlineData("2025-01-00")] [InlineData("0000-01-01")] [InlineData("9999-12-31")]
    [InlineData("2025-1-05")] [InlineData("2025/01/05")] [InlineData("2025-01-5x")] [InlineData("20250105")]
    [InlineData(" 2025-01-05 ")] [InlineData("2025-01-05T00:00")] [InlineData("٢٠٢٥-٠١-٠٥")] [InlineData("+025-01-05")]
    public void Odd_and_invalid_forms_are_accepted_or_refused_as_the_framework_does(string text)
    {
        Assert.Equal(Reference(text), Read(text));
    }
}
