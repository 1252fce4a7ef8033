using SpinSim.Formats;
using SpinSim.Formats.Jcamp;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Formats.Jcamp;

/// <summary>Each defect gives a SpectrumFileException naming the file and the line of the defect.</summary>
public class JcampReaderErrorTests
{
    private const string Name = "defect.jdx";

    private static readonly string Written = JcampSamples.Write(JcampSamples.Synthetic(600), JcampForm.DifDup);

    private static SpectrumFileException Refused(string text)
    {
        var e = Assert.Throws<SpectrumFileException>(() => JcampReader.Parse(text, Name));
        Assert.Equal(Name, e.FilePath);
        Assert.StartsWith(Name, e.Message);
        return e;
    }

    private static int FirstDataLine(string[] lines) => Array.FindIndex(lines, l => l.StartsWith("##XYDATA=")) + 1;

    [Fact]
    public void Y_check_mismatch()
    {
        var lines = JcampSamples.Lines(Written);
        var k = FirstDataLine(lines) + 3;
        // Replace the check value (first SQZ value after the abscissa) with a different one.
        var at = lines[k].IndexOfAny("@ABCDEFGHIabcdefghi".ToCharArray());
        var end = at + 1;
        while (end < lines[k].Length && char.IsAsciiDigit(lines[k][end])) end++;
        lines[k] = lines[k][..at] + "A1" + lines[k][end..];

        var e = Refused(JcampSamples.Join(lines));

        Assert.Equal(k + 1, e.Line);
        Assert.Contains("Y-check", e.Problem);
    }

    [Fact]
    public void Fewer_points_than_npoints()
    {
        var text = Written.Replace("##NPOINTS= 600", "##NPOINTS= 605");

        var e = Refused(text);

        Assert.Equal(JcampSamples.LineOf(text, l => l.StartsWith("##END=")) - 1, e.Line);
        Assert.Contains("NPOINTS=605", e.Problem);
    }

    [Fact]
    public void More_points_than_npoints_fails_where_the_excess_is()
    {
        var text = Written.Replace("##NPOINTS= 600", "##NPOINTS= 100");
        var lines = JcampSamples.Lines(text);

        var e = Refused(text);

        // The failing line is the one holding point 102 (NPOINTS + 1 is tolerated only when DELTAX agrees).
        var start = FirstDataLine(lines);
        Assert.InRange(e.Line!.Value, start + 1, start + 12);
        Assert.Contains("more ordinates", e.Problem);
    }

    [Fact]
    public void One_point_short_without_agreeing_deltax_is_refused()
    {
        // The tolerance for a count off by one needs DELTAX to side with the data; here it is removed.
        var lines = JcampSamples.Lines(Written.Replace("##NPOINTS= 600", "##NPOINTS= 601")).Where(l => !l.StartsWith("##DELTAX=")).ToArray();

        var e = Refused(JcampSamples.Join(lines));

        Assert.Contains("600 ordinates", e.Problem);
    }

    [Fact]
    public void One_point_short_with_agreeing_deltax_reads_with_a_warning()
    {
        var lines = JcampSamples.Lines(Written.Replace("##NPOINTS= 600", "##NPOINTS= 601"));

        var t = JcampReader.Parse(JcampSamples.Join(lines), Name);

        Assert.Equal(600, t.Count);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("NPOINTS=601"));
    }

    [Theory]
    [InlineData("##FIRSTX=")]
    [InlineData("##LASTX=")]
    [InlineData("##NPOINTS=")]
    [InlineData("##XUNITS=")]
    [InlineData("##.OBSERVE FREQUENCY=")]
    public void Missing_required_label(string label)
    {
        var lines = JcampSamples.Lines(Written).Where(l => !l.StartsWith(label)).ToArray();

        var e = Refused(JcampSamples.Join(lines));

        // A missing label has no line of its own: the block's ##TITLE= line is named.
        Assert.Equal(1, e.Line);
        Assert.Contains(label.TrimEnd('=').Replace(" ", "").TrimStart('#'), e.Problem.Replace(" ", ""));
    }

    [Fact]
    public void Title_must_come_first()
    {
        var lines = JcampSamples.Lines(Written)[1..];

        var e = Refused(JcampSamples.Join(lines));

        Assert.Equal(1, e.Line);
        Assert.Contains("##TITLE=", e.Problem);
    }

    [Theory]
    [InlineData("!")]
    [InlineData("#")]
    [InlineData("\u00e9")]
    public void Non_numeric_data(string bad)
    {
        var lines = JcampSamples.Lines(Written);
        var k = FirstDataLine(lines) + 7;
        // Near the end of the line, so that no earlier check on the line fails first.
        lines[k] = lines[k][..^2] + bad + lines[k][^2..];

        var e = Refused(JcampSamples.Join(lines));

        Assert.Equal(k + 1, e.Line);
        Assert.Contains("unexpected character", e.Problem);
    }

    [Fact]
    public void Non_numeric_header_value()
    {
        var text = Written.Replace("##NPOINTS= 600", "##NPOINTS= six hundred");

        var e = Refused(text);

        Assert.Equal(JcampSamples.LineOf(text, l => l.StartsWith("##NPOINTS=")), e.Line);
        Assert.Contains("expected a number", e.Problem);
    }

    [Fact]
    public void Unknown_value_marker()
    {
        var e = Refused(JcampSamples.Minimal("1 1 2 ? 4", 4, 1, 4));

        Assert.Equal(15, e.Line);
        Assert.Contains("'?'", e.Problem);
    }

    [Fact]
    public void Truncated_file()
    {
        var cut = Written[..(Written.Length / 2)];

        var e = Refused(cut);

        Assert.Equal(cut.Split('\n').Length, e.Line);
        Assert.Contains("truncated", e.Problem);
    }

    [Theory]
    [InlineData("")]
    [InlineData("  \r\n\n ")]
    public void Empty_file(string text)
    {
        var e = Refused(text);

        Assert.Null(e.Line);
        Assert.Contains("empty", e.Problem);
    }

    [Fact]
    public void Not_a_jcamp_file()
    {
        var e = Refused("ppm,intensity\n1.0,2.0\n");

        Assert.Contains("no JCAMP-DX labels", e.Problem);
    }

    [Fact]
    public void X_units_must_be_hz_or_ppm()
    {
        var text = Written.Replace("##XUNITS= HZ", "##XUNITS= 1/CM");

        var e = Refused(text);

        Assert.Equal(JcampSamples.LineOf(text, l => l.StartsWith("##XUNITS=")), e.Line);
        Assert.Contains("HZ or PPM", e.Problem);
    }

    [Fact]
    public void Only_a_peak_table_is_not_a_spectrum()
    {
        var text = "##TITLE= peaks\n##JCAMP-DX= 5.01\n##XUNITS= PPM\n##YUNITS= ARBITRARY UNITS\n##PEAK TABLE= (XY..XY)\n1.0, 5\n2.0, 7\n##END=\n";

        var e = Refused(text);

        Assert.Contains("only a peak table", e.Problem);
    }

    [Fact]
    public void Missing_file()
    {
        var path = Path.Combine(Path.GetTempPath(), $"spinsim-missing-{Guid.NewGuid():N}.jdx");

        var e = Assert.Throws<SpectrumFileException>(() => JcampReader.Read(path));

        Assert.Equal(path, e.FilePath);
        Assert.Contains("cannot open", e.Problem);
    }

    [ReferenceFact]
    public void Defects_in_a_public_file_name_their_line()
    {
        // Source: isobutanol-1h-300mhz-sqzdif.jdx (SOURCES.md); line 50 is a data line in DIF form.
        var path = ReferenceData.PathOf("jcamp", "isobutanol-1h-300mhz-sqzdif.jdx");
        var lines = JcampSamples.Lines(File.ReadAllText(path));
        var deleted = lines.Where((_, i) => i != 49).ToArray();

        var e = Assert.Throws<SpectrumFileException>(() => JcampReader.Parse(JcampSamples.Join(deleted), path));

        // With line 50 gone, old line 51 (now line 50) no longer repeats the value its predecessor ends with.
        Assert.Equal(50, e.Line);
        Assert.Contains("Y-check", e.Problem);
        Assert.Contains("isobutanol-1h-300mhz-sqzdif.jdx, line 50", e.Message);
    }
}
