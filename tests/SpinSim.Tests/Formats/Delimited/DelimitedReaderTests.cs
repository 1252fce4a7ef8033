using SpinSim.Formats;
using SpinSim.Formats.Delimited;

namespace SpinSim.Tests.Formats.Delimited;

public class DelimitedReaderTests
{
    private static readonly double[] Ppm = [7.26, 7.25, 7.24];
    private static readonly double[] Y = [10.5, -2.25, 3000];

    [Theory]
    [InlineData("ppm,intensity\n7.26,10.5\n7.25,-2.25\n7.24,3000\n")]
    [InlineData("ppm;intensity\r\n7.26;10.5\r\n7.25;-2.25\r\n7.24;3000\r\n")]
    [InlineData("ppm\tintensity\n7.26\t10.5\n7.25\t-2.25\n7.24\t3000")]
    [InlineData("  ppm   intensity\n 7.26   10.5\n7.25 -2.25\n\n7.24    3.0e3\n")]
    [InlineData("# exported by hand\n7.26,10.5\n7.25,-2.25\n7.24,3000\n")]
    [InlineData("\"ppm\",\"intensity\"\n\"7.26\",\"10.5\"\n7.25,-2.25\n7.24,3000\n")]
    public void Separators_and_headers_are_detected(string text)
    {
        var t = DelimitedReader.Parse(text, "points.csv");

        Assert.Equal(Ppm, t.ShiftPpm);
        Assert.Equal(Y, t.Intensity);
        Assert.Equal("delimited text", t.Origin.Format);
    }

    [Fact]
    public void Decimal_comma_with_semicolons()
    {
        var t = DelimitedReader.Parse("ppm;intensity\n7,26;10,5\n7,25;-2,25\n7,24;3000\n", "komma.csv",
            new DelimitedOptions { DecimalMark = DecimalMark.Comma });

        Assert.Equal(Ppm, t.ShiftPpm);
        Assert.Equal(Y, t.Intensity);
    }

    [Fact]
    public void Columns_by_name_and_by_index()
    {
        const string text = "index,real,imag,ppm\n0,10.5,1,7.26\n1,-2.25,2,7.25\n2,3000,3,7.24\n";

        var byName = DelimitedReader.Parse(text, "wide.csv", new DelimitedOptions { XColumnName = "PPM", YColumnName = "real" });
        var byIndex = DelimitedReader.Parse(text, "wide.csv", new DelimitedOptions { XColumnIndex = 3, YColumnIndex = 1 });

        Assert.Equal(Ppm, byName.ShiftPpm);
        Assert.Equal(Y, byName.Intensity);
        Assert.Equal(byName.ShiftPpm, byIndex.ShiftPpm);
        Assert.Equal(byName.Intensity, byIndex.Intensity);
        Assert.Contains("'ppm'", byName.Origin.Form);
    }

    [Fact]
    public void Stated_header_absent_and_x_in_hz()
    {
        var t = DelimitedReader.Parse("2904 10.5\n2900 -2.25\n2896 3000\n", "hz.txt",
            new DelimitedOptions { HasHeader = false, XUnit = DelimitedXUnit.Hz, ObserveMHz = 400, Separator = ColumnSeparator.Whitespace });

        Assert.Equal([7.26, 7.25, 7.24], t.ShiftPpm);
        Assert.Equal(400, t.ObserveMHz);
        Assert.Equal(2904, t.FrequencyAt(0).Value, 1e-9);
    }

    [Fact]
    public void Hz_without_observe_frequency_is_refused()
    {
        var e = Assert.Throws<SpectrumFileException>(() =>
            DelimitedReader.Parse("2904,1\n", "hz.csv", new DelimitedOptions { XUnit = DelimitedXUnit.Hz }));

        Assert.Contains("observe frequency", e.Problem);
    }

    [Fact]
    public void Non_numeric_value_names_line_and_column()
    {
        var e = Assert.Throws<SpectrumFileException>(() =>
            DelimitedReader.Parse("ppm,intensity\n7.26,10.5\n\n7.25,abc\n", "bad.csv"));

        Assert.Equal(4, e.Line);
        Assert.Contains("'intensity'", e.Problem);
        Assert.StartsWith("bad.csv, line 4:", e.Message);
    }

    [Fact]
    public void Decimal_comma_unstated_is_detected_with_a_warning()
    {
        // Semicolon columns cannot hold a comma separator, so "7,26" is a number with a decimal comma (common practice, no source).
        var t = DelimitedReader.Parse("ppm;intensity\n7,26;10,5\n7,25;11\n", "komma.csv");

        Assert.Equal([7.26, 7.25], t.ShiftPpm);
        Assert.Equal([10.5, 11.0], t.Intensity);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("decimal comma"));
    }

    [Fact]
    public void Comma_columns_of_whole_numbers_name_the_options()
    {
        var e = Assert.Throws<SpectrumFileException>(() => DelimitedReader.Parse("ppm,intensity\n7,26,10,5\n", "komma.csv"));

        Assert.Equal(2, e.Line);
        Assert.Contains("--decimal-comma", e.Problem);
        Assert.Contains("--separator", e.Problem);
    }

    [Fact]
    public void X_unit_is_read_from_the_header()
    {
        // 400 MHz: 2904 Hz is 7.26 ppm (nu = delta x SF; exact arithmetic).
        var t = DelimitedReader.Parse("freq_Hz,intensity\n2904,1\n2900,2\n", "hz.csv", new DelimitedOptions { ObserveMHz = 400 });

        Assert.Equal(7.26, t.ShiftPpm[0], 12);
        Assert.Equal(7.25, t.ShiftPpm[1], 12);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("Hz"));
        var e = Assert.Throws<SpectrumFileException>(() => DelimitedReader.Parse("Hz,intensity\n2904,1\n", "hz.csv"));
        Assert.Contains("observe", e.Problem);
    }

    [Fact]
    public void Point_index_column_is_skipped()
    {
        var t = DelimitedReader.Parse("index,ppm,intensity\n0,7.30,1\n1,7.29,2\n2,7.28,3\n3,7.27,4\n", "indexed.csv");

        Assert.Equal([7.30, 7.29, 7.28, 7.27], t.ShiftPpm);
        Assert.Equal([1.0, 2, 3, 4], t.Intensity);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("counts points"));
    }

    [Fact]
    public void Too_few_columns()
    {
        var e = Assert.Throws<SpectrumFileException>(() =>
            DelimitedReader.Parse("7.26,10.5\n7.25\n", "short.csv"));

        Assert.Equal(2, e.Line);
        Assert.Contains("1 column", e.Problem);
    }

    [Fact]
    public void Unknown_column_name_lists_the_columns()
    {
        var e = Assert.Throws<SpectrumFileException>(() =>
            DelimitedReader.Parse("# note\nppm,intensity\n7.26,10.5\n", "names.csv", new DelimitedOptions { YColumnName = "real" }));

        Assert.Equal(2, e.Line);
        Assert.Contains("'ppm', 'intensity'", e.Problem);
    }

    [Fact]
    public void Name_without_header_is_refused()
    {
        var e = Assert.Throws<SpectrumFileException>(() =>
            DelimitedReader.Parse("7.26,10.5\n", "nohead.csv", new DelimitedOptions { XColumnName = "ppm" }));

        Assert.Equal(1, e.Line);
        Assert.Contains("no header", e.Problem);
    }

    [Theory]
    [InlineData("")]
    [InlineData("# only a comment\n\n")]
    public void Empty_file(string text)
    {
        var e = Assert.Throws<SpectrumFileException>(() => DelimitedReader.Parse(text, "empty.csv"));

        Assert.Null(e.Line);
        Assert.Contains("empty", e.Problem);
    }

    [Fact]
    public void Header_only()
    {
        var e = Assert.Throws<SpectrumFileException>(() => DelimitedReader.Parse("ppm,intensity\n", "head.csv"));

        Assert.Contains("no data", e.Problem);
    }

    [Fact]
    public void Infinite_values_are_refused()
    {
        var e = Assert.Throws<SpectrumFileException>(() => DelimitedReader.Parse("7.26,1e999\n", "inf.csv"));

        Assert.Equal(1, e.Line);
    }
}
