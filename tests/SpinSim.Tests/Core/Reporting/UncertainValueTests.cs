using SpinSim.Core.Reporting;

namespace SpinSim.Tests.Core.Reporting;

public sealed class UncertainValueTests
{
    // The rule: ISO GUM (JCGM 100:2008) 7.2.6, the uncertainty with at most two significant digits, the value rounded to
    // the same place, written in the concise form of GUM 7.2.2 ("100.021 47(35) g"). One or two digits by the common
    // practice of the Particle Data Group (recalled from memory): leading digits 100-354 keep two, 355-949 one,
    // 950-999 round up to two digits of the next decade. Expected strings worked out by hand from that rule.
    [Theory]
    [InlineData(7.35201, 0.00012, "7.35201(12)")]       // 120: two digits
    [InlineData(7.352049, 0.0001, "7.35205(10)")]        // 100: two digits
    [InlineData(7.3520, 0.00042, "7.3520(4)")]           // 420: one digit
    [InlineData(8.4512, 0.04, "8.45(4)")]                // the example
    [InlineData(2.762, 8E-06, "2.762000(8)")]            // the "2.762000 ± 8E-06"
    [InlineData(-16.0989, 0.0017, "-16.0989(17)")]       // 170: two digits
    [InlineData(-16.0989, 0.0036, "-16.099(4)")]         // 360: one digit, value rounded half away from zero
    [InlineData(1.23456, 0.0354, "1.235(35)")]           // 354: still two digits
    [InlineData(1.23456, 0.0355, "1.23(4)")]             // 355: one digit
    [InlineData(1.23456, 0.0097, "1.235(10)")]           // 970: up to 0.010, two digits
    [InlineData(0.64956, 0.00083, "0.6496(8)")]
    [InlineData(8.45, 1.2, "8.5(12)")]                   // uncertainty across the decimal point: digits of the last places
    [InlineData(123.4, 26, "123(26)")]
    [InlineData(12345, 1500, "12300(1500)")]             // left of the decimal point the bracket is written out
    public void Value_is_rounded_to_the_place_of_its_uncertainty(double value, double uncertainty, string expected) =>
        Assert.Equal(expected, new UncertainValue(value, uncertainty).Concise());

    [Theory]
    [InlineData(0.0017, "0.0017")]
    [InlineData(0.00042, "0.0004")]
    [InlineData(0.0097, "0.010")]
    public void Uncertainty_alone_keeps_one_or_two_significant_digits(double uncertainty, string expected) =>
        Assert.Equal(expected, new UncertainValue(1, uncertainty).RoundedUncertainty());

    [Theory]
    [InlineData(double.NaN)]
    [InlineData(0.0)]
    [InlineData(double.PositiveInfinity)]
    public void Without_a_usable_uncertainty_the_value_gets_the_fallback_decimals(double uncertainty)
    {
        var v = new UncertainValue(-2.0002, uncertainty);
        Assert.Null(v.Decimals);
        Assert.Equal("-2.00", v.Concise(fallbackDecimals: 2));
        Assert.Equal("\u22122.00", v.Concise(fallbackDecimals: 2, trueMinus: true));
    }
}
