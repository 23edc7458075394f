using System.Globalization;
using System.Text;
using Lookahead.Api.Http;
using Xunit;

namespace Lookahead.Api.Tests;

public class CompactNumberTests
{
    private static string Format(double v)
    {
        Span<byte> buffer = stackalloc byte[CompactNumber.MaxLength];
        return Encoding.ASCII.GetString(buffer[..CompactNumber.Format(v, buffer)]);
    }

    [Theory]
    [InlineData(0.0, "0")]
    [InlineData(1.0, "1")]
    [InlineData(-2.5, "-2.5")]
    [InlineData(0.1, "0.1")]
    [InlineData(100.0, "100")]
    [InlineData(123456.789, "123456.789")]
    [InlineData(0.000123, "0.000123")]
    [InlineData(999999999999999.0, "999999999999999")]
    [InlineData(0.9999999999999999, "1")]
    [InlineData(1e-12, "1e-12")]
    [InlineData(-2.5e20, "-2.5e20")]
    public void WritesShortExactForms(double value, string expected) => Assert.Equal(expected, Format(value));

    [Fact]
    public void NegativeZeroIsWrittenAsZero() => Assert.Equal("0", Format(-0.0));

    // 15 significant digits: the parsed value is within half a unit in the 15th digit plus the scaling's rounding (6e-15 relative).
    [Fact]
    public void RandomValuesRoundTripToFifteenDigits()
    {
        var random = new Random(3);
        for (int i = 0; i < 200_000; i++)
        {
            double value = (random.NextDouble() - 0.5) * Math.Pow(10, random.Next(-300, 300));
            string text = Format(value);
            double parsed = double.Parse(text, CultureInfo.InvariantCulture);
            Assert.True(Math.Abs(parsed - value) <= 6e-15 * Math.Abs(value), $"{value:R} → {text}");
            Assert.Matches("^-?(0|[1-9][0-9]*)(\\.[0-9]+)?([eE][-+]?[0-9]+)?$", text); // a JSON number
        }
    }

    [Theory]
    [InlineData(1e-300)]
    [InlineData(-3.5e300)]
    [InlineData(double.Epsilon)]
    public void FallsBackOutsideTheFastRange(double value) =>
        Assert.Equal(value, double.Parse(Format(value), CultureInfo.InvariantCulture));
}
