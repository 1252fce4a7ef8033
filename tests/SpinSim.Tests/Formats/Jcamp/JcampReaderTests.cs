using SpinSim.Formats;
using SpinSim.Formats.Jcamp;

namespace SpinSim.Tests.Formats.Jcamp;

/// <summary>Reader behaviour on small texts made for the tests.</summary>
public class JcampReaderTests
{
    [Fact]
    public void Labels_compare_ignoring_case_spaces_dashes_slashes_and_underscores()
    {
        // Source: McDonald & Wilks 1988, section on labels: only letters, digits and the leading
        // '.' or '$' are significant (from memory of the rule the spec states).
        const string text = "##title= spelled oddly\n##Jcamp_Dx= 4.24\n##Data-Type= NMR SPECTRUM\n##.observe frequency= 100\n"
            + "##.Observe_Nucleus= ^13C\n##x units= PPM\n##YUNITS= ARBITRARY UNITS\n##x_factor= 1\n##Y/FACTOR= 2\n"
            + "##first x= 3\n##LAST_X= 1\n##n points= 3\n##xy data= (X++(Y..Y))\n3 10 20 30\n##end=\n";

        var t = JcampReader.Parse(text, "odd.jdx");

        Assert.Equal([3.0, 2.0, 1.0], t.ShiftPpm);
        Assert.Equal([20.0, 40.0, 60.0], t.Intensity);
        Assert.Equal("13C", t.Nucleus);
        Assert.Equal(100, t.ObserveMHz);
    }

    [Fact]
    public void Comments_are_ignored_in_header_and_data()
    {
        var text = JcampSamples.Minimal("1 1 2 $$ two values\n$$ a whole comment line\n3 3 4 $$ and two more", 4, 1, 4,
            extraHeader: "##= a 4.24 comment record\n$$ a comment line in the header\n");

        var t = JcampReader.Parse(text, "comments.jdx");

        Assert.Equal([1.0, 2, 3, 4], t.Intensity);
        Assert.Empty(t.Origin.Warnings);
    }

    [Fact]
    public void Cr_only_line_ends_are_read()
    {
        var t = JcampReader.Parse(JcampSamples.Minimal("1 1 2\n3 3 4", 4, 1, 4).Replace('\n', '\r'), "mac.jdx");

        Assert.Equal([1.0, 2, 3, 4], t.Intensity);
    }

    [Fact]
    public void Peak_table_beside_a_spectrum_is_ignored_with_a_warning()
    {
        var text = JcampSamples.Minimal("1 1 2 3 4", 4, 1, 4).Replace("##END=", "##PEAK TABLE= (XY..XY)\n2, 2\n##END=");

        var t = JcampReader.Parse(text, "peaks.jdx");

        Assert.Equal([1.0, 2, 3, 4], t.Intensity);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("PEAK TABLE") && w.Contains("ignored"));
    }

    [Fact]
    public void Link_file_reads_the_first_spectrum_and_lists_the_other_blocks()
    {
        var first = JcampSamples.Minimal("1 1 2 3 4", 4, 1, 4).Replace("test block", "first spectrum");
        var second = JcampSamples.Minimal("1 5 6 7 8", 4, 1, 4).Replace("test block", "second spectrum");
        var text = "##TITLE= link\n##JCAMP-DX= 5.01\n##DATA TYPE= LINK\n##BLOCKS= 2\n" + first + second + "##END=\n";

        var t = JcampReader.Parse(text, "link.jdx");

        Assert.Equal([1.0, 2, 3, 4], t.Intensity);
        var note = Assert.Single(t.Origin.Warnings, w => w.Contains("3 blocks"));
        Assert.Contains("read block 2 'first spectrum'", note);
        Assert.Contains("'second spectrum'", note);
        Assert.Contains("a spectrum not read", note);
    }

    [Fact]
    public void Shift_reference_anchors_a_hz_axis()
    {
        // Point 3 (of 4) at 1.0 ppm; x in Hz at 100 MHz with 50 Hz steps: 0.5 ppm per point.
        var text = JcampSamples.Minimal("300 1 2 3 4", 4, 300, 150, extraHeader: "##.SHIFT REFERENCE= (INTERNAL, TMS, 3, 1.0)\n")
            .Replace("##XUNITS= PPM", "##XUNITS= HZ").Replace("##.OBSERVE FREQUENCY= 400.0", "##.OBSERVE FREQUENCY= 100");

        var t = JcampReader.Parse(text, "ref.jdx");

        Assert.Equal([2.0, 1.5, 1.0, 0.5], t.ShiftPpm);
        Assert.DoesNotContain(t.Origin.Warnings, w => w.Contains("SHIFT REFERENCE"));
    }

    [Fact]
    public void Private_offset_label_gives_the_ppm_of_the_first_point()
    {
        var text = JcampSamples.Minimal("300 1 2 3 4", 4, 300, 150, extraHeader: "##$OFFSET= 12.5\n")
            .Replace("##XUNITS= PPM", "##XUNITS= HZ").Replace("##.OBSERVE FREQUENCY= 400.0", "##.OBSERVE FREQUENCY= 100");

        var t = JcampReader.Parse(text, "offset.jdx");

        Assert.Equal([12.5, 12.0, 11.5, 11.0], t.ShiftPpm);
    }

    [Fact]
    public void Malformed_shift_reference_is_refused()
    {
        var text = JcampSamples.Minimal("300 1 2 3 4", 4, 300, 150, extraHeader: "##.SHIFT REFERENCE= TMS\n")
            .Replace("##XUNITS= PPM", "##XUNITS= HZ");

        var e = Assert.Throws<SpectrumFileException>(() => JcampReader.Parse(text, "ref.jdx"));

        Assert.Equal(JcampSamples.LineOf(text, l => l.StartsWith("##.SHIFT")), e.Line);
    }

    [Fact]
    public void Xypoints_table()
    {
        var text = JcampSamples.Minimal("", 3, 1, 3).Replace("##XYDATA= (X++(Y..Y))\n\n", "##XYPOINTS= (XY..XY)\n1, 10; 2.5, 20\n3, 30\n");

        var t = JcampReader.Parse(text, "points.jdx");

        Assert.Equal([1.0, 2.5, 3.0], t.ShiftPpm);
        Assert.Equal([10.0, 20, 30], t.Intensity);
        Assert.Equal("XYPOINTS (XY..XY) AFFN", t.Origin.Form);
    }

    [Fact]
    public void Xypoints_count_must_match()
    {
        var text = JcampSamples.Minimal("", 4, 1, 3).Replace("##XYDATA= (X++(Y..Y))\n\n", "##XYPOINTS= (XY..XY)\n1, 10\n2, 20\n3, 30\n");

        var e = Assert.Throws<SpectrumFileException>(() => JcampReader.Parse(text, "points.jdx"));

        Assert.Equal(JcampSamples.LineOf(text, l => l.StartsWith("3, 30")), e.Line);
    }

    [Fact]
    public void Line_abscissae_far_from_the_axis_give_one_warning()
    {
        // Abscissae 10 and 30 where the axis says 1 and 3.
        var t = JcampReader.Parse(JcampSamples.Minimal("10 1 2\n30 3 4", 4, 1, 4), "x.jdx");

        Assert.Equal([1.0, 2, 3, 4], t.ShiftPpm);
        Assert.Single(t.Origin.Warnings, w => w.Contains("line abscissae disagree") && w.Contains("2 of 2"));
    }
}
