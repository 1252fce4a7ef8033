using System.Globalization;
using SpinSim.Core.Traces;
using SpinSim.Formats.Jcamp;

namespace SpinSim.Tests.Formats.Jcamp;

public class JcampWriterTests
{
    private static double LabelValue(string text, string label) =>
        double.Parse(JcampSamples.Lines(text).First(l => l.StartsWith($"##{label}=")).Split('=', 2)[1], CultureInfo.InvariantCulture);

    private static string[] DataLines(string text)
    {
        var lines = JcampSamples.Lines(text);
        var start = Array.FindIndex(lines, l => l.StartsWith("##XYDATA=")) + 1;
        var end = Array.FindIndex(lines, l => l.StartsWith("##END="));
        return lines[start..end];
    }

    [Theory]
    [InlineData(JcampForm.Affn, true)]
    [InlineData(JcampForm.DifDup, true)]
    [InlineData(JcampForm.Affn, false)]
    [InlineData(JcampForm.DifDup, false)]
    public void Round_trip_gives_back_the_digits_written(JcampForm form, bool descending)
    {
        var trace = JcampSamples.Synthetic(4099, descending: descending);
        var text = JcampSamples.Write(trace, form, "synthetic trace, not measured");

        var back = JcampReader.Parse(text, "round-trip.jdx");

        // The intensities come back as the integers written times YFACTOR, exactly.
        var yFactor = LabelValue(text, "YFACTOR");
        var written = trace.Intensity.Select(v => Math.Round(v / yFactor, MidpointRounding.AwayFromZero) * yFactor).ToArray();
        Assert.Equal(written, back.Intensity);
        // and so within half a unit of the last digit of the originals.
        for (var i = 0; i < trace.Count; i++)
            Assert.True(Math.Abs(back.Intensity[i] - trace.Intensity[i]) <= 0.5 * yFactor * (1 + 1e-9), $"point {i}");
        for (var i = 0; i < trace.Count; i++)
            Assert.Equal(trace.ShiftPpm[i], back.ShiftPpm[i], 1e-11);
        Assert.Equal(trace.ObserveMHz, back.ObserveMHz);
        Assert.Equal("1H", back.Nucleus);
        Assert.Equal("JCAMP-DX 5.01", back.Origin.Format);
        Assert.Empty(back.Origin.Warnings);
        // Noise leaves no runs for DUP, so the DIFDUP form reads back as SQZ and DIF.
        Assert.Equal(form == JcampForm.DifDup ? "XYDATA (X++(Y..Y)) SQZ+DIF" : "XYDATA (X++(Y..Y)) AFFN", back.Origin.Form);
    }

    [Fact]
    public void Yfactor_is_a_power_of_ten_keeping_nine_to_ten_digits_in_32_bits()
    {
        foreach (var scale in new[] { 1e-7, 0.3, 1.0, 7.0, 1234.5, 9.99e12 })
        {
            var trace = new SpectrumTrace([1, 2, 3], [scale, -scale / 3, 0], 400, "1H", TraceOrigin.Describe("scale"));
            var text = JcampSamples.Write(trace, JcampForm.Affn);

            var yFactor = LabelValue(text, "YFACTOR");
            var largestInteger = scale / yFactor;
            Assert.Equal(Math.Round(Math.Log10(yFactor)), Math.Log10(yFactor), 1e-9);
            Assert.InRange(largestInteger, int.MaxValue / 10.0, int.MaxValue);
        }
    }

    [Fact]
    public void Dif_y_checks_in_a_written_file_verify()
    {
        var trace = JcampSamples.Synthetic(3000, seed: 11);
        var text = JcampSamples.Write(trace, JcampForm.DifDup);
        var lines = DataLines(text);

        // Each line decoded on its own (no check): its first value must equal the previous line's last one,
        // because every line the writer makes ends in DIF form; the last line holds only the final check.
        double[] Decode(string line) =>
            AsdfDecoder.DecodeXyData(line, 0, line.Length, 1, 0, 1 << 20, "line").Y[..CountOf(line)];
        int CountOf(string line) => AsdfDecoder.DecodeXyData(line, 0, line.Length, 1, 0, 1 << 20, "line").Count;
        for (var k = 1; k < lines.Length; k++)
            Assert.Equal(Decode(lines[k - 1])[^1], Decode(lines[k])[0]);
        Assert.Single(Decode(lines[^1]));
        Assert.True(lines.Length > 20);
    }

    [Fact]
    public void Corrupting_a_written_y_check_is_caught()
    {
        var text = JcampSamples.Write(JcampSamples.Synthetic(1000), JcampForm.DifDup);
        var lines = JcampSamples.Lines(text);
        var target = Array.FindIndex(lines, l => l.StartsWith("##XYDATA=")) + 5;
        // Add a digit to the check value: the first SQZ value after the abscissa.
        var at = lines[target].IndexOfAny("@ABCDEFGHIabcdefghi".ToCharArray());
        lines[target] = lines[target][..(at + 1)] + "7" + lines[target][(at + 1)..];

        var e = Assert.Throws<SpinSim.Formats.SpectrumFileException>(() => JcampReader.Parse(JcampSamples.Join(lines), "corrupt.jdx"));

        Assert.Equal(target + 1, e.Line);
        Assert.Contains("Y-check", e.Message);
    }

    [Theory]
    [InlineData(JcampForm.Affn)]
    [InlineData(JcampForm.DifDup)]
    public void Lines_are_at_most_80_characters_and_the_header_has_the_nmr_labels(JcampForm form)
    {
        var text = JcampSamples.Write(JcampSamples.Synthetic(2000), form,
            "a provenance note long enough to need wrapping onto a second comment line because it runs on past eighty characters");
        var lines = JcampSamples.Lines(text);

        Assert.All(lines, l => Assert.True(l.Length <= 80, l));
        // Source: McDonald & Wilks 1988 (required labels) and Davies & Lampen 1993 (NMR labels).
        foreach (var label in new[] { "##TITLE=", "##JCAMP-DX= 5.01", "##DATA TYPE= NMR SPECTRUM", "##DATA CLASS= XYDATA", "##ORIGIN=",
                     "##OWNER=", "##.OBSERVE FREQUENCY= 400.13", "##.OBSERVE NUCLEUS= ^1H", "##.SHIFT REFERENCE=", "##XUNITS= HZ",
                     "##YUNITS=", "##XFACTOR=", "##YFACTOR=", "##FIRSTX=", "##LASTX=", "##DELTAX=", "##NPOINTS= 2000",
                     "##FIRSTY=", "##MAXY=", "##MINY=", "##XYDATA= (X++(Y..Y))" })
            Assert.Contains(lines, l => l.StartsWith(label));
        Assert.Equal("##END=", lines[^2]);
        Assert.Equal(2, lines.Count(l => l.StartsWith("$$ ")));
        Assert.Contains("\r\n", text);
    }

    [Fact]
    public void Hz_values_are_the_ppm_axis_times_the_observe_frequency()
    {
        var trace = JcampSamples.Synthetic(101);
        var text = JcampSamples.Write(trace, JcampForm.Affn);

        Assert.Equal(10.0 * 400.13, LabelValue(text, "FIRSTX"), 1e-9);
        Assert.Equal(-0.5 * 400.13, LabelValue(text, "LASTX"), 1e-9);
    }

    [Fact]
    public void Without_an_observe_frequency_x_is_written_in_ppm()
    {
        var source = JcampSamples.Synthetic(200);
        var trace = new SpectrumTrace(source.ShiftPpm, source.Intensity, null, "1H", TraceOrigin.Describe("no field"));
        var text = JcampSamples.Write(trace, JcampForm.DifDup);

        var back = JcampReader.Parse(text, "ppm.jdx");

        Assert.Contains("##XUNITS= PPM", text);
        Assert.Null(back.ObserveMHz);
        for (var i = 0; i < trace.Count; i++) Assert.Equal(trace.ShiftPpm[i], back.ShiftPpm[i], 1e-12);
    }

    [Fact]
    public void An_uneven_axis_is_written_as_xy_pairs()
    {
        double[] ppm = [1.0, 1.1, 1.3, 1.6, 2.0];
        double[] y = [5, -4, 3, 2, 1];
        var trace = new SpectrumTrace(ppm, y, 100, "13C", TraceOrigin.Describe("uneven"));
        var text = JcampSamples.Write(trace, JcampForm.DifDup);

        var back = JcampReader.Parse(text, "uneven.jdx");

        Assert.Contains("##XYPOINTS= (XY..XY)", text);
        Assert.Equal(y, back.Intensity);
        Assert.Equal("13C", back.Nucleus);
        for (var i = 0; i < ppm.Length; i++) Assert.Equal(ppm[i], back.ShiftPpm[i], 1e-12);
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    public void Tiny_traces_round_trip(int n)
    {
        var trace = new SpectrumTrace(Enumerable.Range(0, n).Select(i => 1.0 + i).ToArray(),
            Enumerable.Range(0, n).Select(i => 3.0 - i).ToArray(), 300, "1H", TraceOrigin.Describe("tiny"));
        foreach (var form in new[] { JcampForm.Affn, JcampForm.DifDup })
        {
            var back = JcampReader.Parse(JcampSamples.Write(trace, form), "tiny.jdx");
            // 3 and 2 are exact at YFACTOR 1E-09.
            Assert.Equal(trace.Intensity, back.Intensity);
            Assert.Equal(trace.ShiftPpm[0], back.ShiftPpm[0], 1e-12);
        }
    }

    [Fact]
    public void Constant_runs_compress_with_dup()
    {
        var trace = new SpectrumTrace(Enumerable.Range(0, 100).Select(i => (double)i).ToArray(),
            Enumerable.Repeat(7.0, 100).ToArray(), 400, "1H", TraceOrigin.Describe("flat"));
        var text = JcampSamples.Write(trace, JcampForm.DifDup);

        // 7 at YFACTOR 1E-08 is 700000000, "G00000000" in SQZ; then 99 zero differences, "%" with DUP 99 "s9".
        Assert.Contains("##YFACTOR= 1E-08", text);
        Assert.Contains("G00000000%s9", text);
        Assert.Equal(trace.Intensity, JcampReader.Parse(text, "flat.jdx").Intensity);
    }
}
