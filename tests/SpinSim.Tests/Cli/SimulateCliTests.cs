using System.Globalization;
using SpinSim.Formats.Jcamp;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Cli;

public class SimulateCliTests
{
    private static string Temp(string ext) => Path.Combine(Path.GetTempPath(), $"spinsim-{Guid.NewGuid():N}{ext}");

    public static IEnumerable<object[]> Examples() =>
        Directory.GetFiles(Path.Combine(ReferenceData.RepositoryRoot, "spin-systems"), "*.toml").Select(f => new object[] { Path.GetFileName(f) });

    [Theory]
    [MemberData(nameof(Examples))]
    public void EveryExampleWritesCsvAndJcampThatReadBack(string example)
    {
        var csv = Temp(".csv");
        var jdx = Temp(".jdx");
        var (code, o, err) = CliTests.Run("simulate", CliTests.Example(example), "--spectrum", csv, "--points", "4096", "--shape", "voigt", "--linewidth", "1.2");
        Assert.True(code == 0, err);
        Assert.Contains("integrals", o);
        (code, _, err) = CliTests.Run("simulate", CliTests.Example(example), "--spectrum", jdx, "--points", "4096", "--shape", "voigt", "--linewidth", "1.2", "--jcamp-form", "difdup");
        Assert.True(code == 0, err);

        var rows = File.ReadAllLines(csv).Where(l => !l.StartsWith('#')).ToList();
        Assert.Equal("shift_ppm,intensity", rows[0]);
        var y = rows.Skip(1).Select(r => double.Parse(r.Split(',')[1], CultureInfo.InvariantCulture)).ToArray();
        Assert.Equal(4096, y.Length);

        // JCAMP-DX 5.01 read back by SpinSim's reader: same points to the written precision (YFACTOR keeps >= 9 digits).
        var trace = JcampReader.Read(jdx);
        Assert.Equal(4096, trace.Count);
        Assert.Equal("1H", trace.Nucleus);
        var max = y.Max();
        for (var i = 0; i < y.Length; i++) Assert.True(Math.Abs(trace.Intensity[i] - y[i]) <= 1e-8 * max, $"point {i}");
        File.Delete(csv);
        File.Delete(jdx);
    }

    [Fact]
    public void WindowPointsAndFieldGoIntoTheJcampHeader()
    {
        var jdx = Temp(".jdx");
        var (code, _, err) = CliTests.Run("simulate", CliTests.Example("para-ring-aabb.toml"), "--field", "90", "--from", "7.6", "--to", "6.8", "--points", "2048", "--spectrum", jdx);
        Assert.True(code == 0, err);
        var text = File.ReadAllText(jdx);
        Assert.Contains("##.OBSERVE FREQUENCY= 90", text);
        Assert.Contains("##.OBSERVE NUCLEUS= ^1H", text);
        var trace = JcampReader.Read(jdx);
        Assert.Equal(90.0, trace.ObserveMHz!.Value, 9);
        Assert.Equal(7.6, trace.ShiftPpm[0], 9);
        Assert.Equal(6.8, trace.ShiftPpm[^1], 9);
        Assert.Equal(2048, trace.Count);
        File.Delete(jdx);
    }

    [Fact]
    public void NoiseIsSeededAndLabelledSynthetic()
    {
        var a = Temp(".csv");
        var b = Temp(".csv");
        var c = Temp(".jdx");
        Assert.Equal(0, CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--points", "1024", "--noise", "0.01", "--seed", "7", "--spectrum", a).Code);
        Assert.Equal(0, CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--points", "1024", "--noise", "0.01", "--seed", "7", "--spectrum", b).Code);
        Assert.Equal(0, CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--points", "1024", "--noise", "0.01", "--seed", "7", "--spectrum", c).Code);
        Assert.Equal(File.ReadAllText(a), File.ReadAllText(b));
        Assert.Contains("synthetic Gaussian noise", File.ReadAllText(a));
        Assert.Contains("synthetic", File.ReadAllText(c));
        foreach (var f in new[] { a, b, c }) File.Delete(f);
    }

    [Theory]
    [InlineData("--points", "1")]
    [InlineData("--linewidth", "0")]
    [InlineData("--noise", "-1")]
    public void BadTraceOptionsAreUserErrors(string option, string value)
    {
        var (code, _, err) = CliTests.Run("simulate", CliTests.Example("vinyl.toml"), option, value);
        Assert.Equal(1, code);
        Assert.Contains(option, err);
    }

    [Fact]
    public void UnknownShapeIsAUsageError() => Assert.Equal(2, CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--shape", "triangle").Code);
}
