using SpinSim.Formats;
using SpinSim.Formats.Jcamp;

namespace SpinSim.Tests.Formats.Jcamp;

public class AsdfDecoderTests
{
    private static readonly double[] ExampleY = [1, 2, 3, 3, 2, 1, 0, -1, -2, -3];

    // Source: McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988), ASDF section: the one sequence
    // Y = 1 2 3 3 2 1 0 -1 -2 -3 printed in each compressed form. The lines are quoted from memory of
    // the spec's example (X = 1 here), not copied from the paper.
    [Theory]
    [InlineData("AFFN", "1 1 2 3 3 2 1 0 -1 -2 -3")]
    [InlineData("PAC", "1+1+2+3+3+2+1+0-1-2-3")]
    [InlineData("SQZ", "1ABCCBA@abc")]
    [InlineData("DIF", "1AJJ%jjjjjj")]
    [InlineData("DIFDUP", "1AJT%jX")]
    public void Spec_example_decodes_to_the_same_values_in_every_form(string form, string line)
    {
        var trace = JcampReader.Parse(JcampSamples.Minimal(line, 10, 1, 10), form);

        Assert.Equal(ExampleY, trace.Intensity);
        Assert.Equal(Enumerable.Range(1, 10).Select(i => (double)i), trace.ShiftPpm);
        Assert.Empty(trace.Origin.Warnings);
    }

    [Fact]
    public void Forms_mix_on_one_line()
    {
        // Made for this test: AFFN "2", SQZ "C", DUP "T" of an absolute value, DIF "j", DUP of a
        // difference, SQZ "a", PAC "-2": the same ten values as the spec example.
        var trace = JcampReader.Parse(JcampSamples.Minimal("1A 2CTBjTa-2c", 10, 1, 10), "mixed");

        Assert.Equal(ExampleY, trace.Intensity);
        Assert.Contains("SQZ", trace.Origin.Form);
        Assert.Contains("DIF", trace.Origin.Form);
        Assert.Contains("DUP", trace.Origin.Form);
    }

    [Fact]
    public void Dif_y_check_repeats_the_last_value_and_is_dropped()
    {
        // Second line starts with B = 2, the last value of the first line (the Y check).
        var trace = JcampReader.Parse(JcampSamples.Minimal("1AJJ%j\n5Bjjjjj", 10, 1, 10), "check");

        Assert.Equal(ExampleY, trace.Intensity);
        Assert.Empty(trace.Origin.Warnings);
    }

    [Fact]
    public void Dif_y_check_mismatch_is_an_error_on_the_checked_line()
    {
        var text = JcampSamples.Minimal("1AJJ%j\n5Cjjjjj", 10, 1, 10);

        var e = Assert.Throws<SpectrumFileException>(() => JcampReader.Parse(text, "bad-check.jdx"));

        Assert.Equal(JcampSamples.LineOf(text, l => l.StartsWith("5C")), e.Line);
        Assert.Contains("Y-check", e.Message);
        Assert.StartsWith("bad-check.jdx, line ", e.Message);
    }

    [Theory]
    [InlineData("1 1.5E+01 -2.5e-01", new[] { 15.0, -0.25 })]   // AFFN exponent: sign and digits follow E
    [InlineData("1E1 e2", new[] { 51.0, -52.0 })]                // E right after the abscissa is SQZ +5
    [InlineData("1 .5 -.25", new[] { 0.5, -0.25 })]
    [InlineData("1A.5J.25", new[] { 1.5, 2.75 })]                // decimals in SQZ and DIF values: J.25 is +1.25
    public void Numbers_in_each_form(string line, double[] expected)
    {
        var trace = JcampReader.Parse(JcampSamples.Minimal(line, expected.Length, 1, expected.Length), "numbers");

        Assert.Equal(expected, trace.Intensity);
    }

    [Fact]
    public void Dup_counts_of_nine_and_above()
    {
        // "s" is 9 and "S0" is 10 (McDonald & Wilks 1988, DUP pseudo-digits S-Z = 1-8, s = 9).
        var nine = JcampReader.Parse(JcampSamples.Minimal("1As", 9, 1, 9), "nine");
        var ten = JcampReader.Parse(JcampSamples.Minimal("1AJS0", 11, 1, 11), "ten");

        Assert.Equal(Enumerable.Repeat(1.0, 9), nine.Intensity);
        Assert.Equal(Enumerable.Range(1, 11).Select(i => (double)i), ten.Intensity);
    }
}
