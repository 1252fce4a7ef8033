using System.Text.Json;
using SpinSim.Core.Traces;
using SpinSim.Formats;
using SpinSim.Formats.Jcamp;
using SpinSim.Tests.Formats.Jcamp;

namespace SpinSim.Tests.Formats;

public sealed class SpectrumFilesTests : IDisposable
{
    private readonly string _folder = Directory.CreateTempSubdirectory("spinsim-files-").FullName;

    public void Dispose() => Directory.Delete(_folder, recursive: true);

    private string PathOf(string name) => Path.Combine(_folder, name);

    [Theory]
    [InlineData("trace.jdx")]
    [InlineData("trace.DX")]
    [InlineData("trace.jcamp")]
    public void Jcamp_extensions_go_to_the_jcamp_reader(string name)
    {
        JcampWriter.Write(JcampSamples.Synthetic(300), PathOf(name), JcampForm.DifDup, ["synthetic trace, not measured"]);

        var t = SpectrumFiles.Read(PathOf(name));

        Assert.Equal(300, t.Count);
        Assert.Equal("JCAMP-DX 5.01", t.Origin.Format);
        Assert.Equal(PathOf(name), t.Origin.Source);
    }

    [Theory]
    [InlineData("trace.csv", "ppm,y\n1.5,2\n1.4,3\n")]
    [InlineData("trace.tsv", "1.5\t2\n1.4\t3\n")]
    [InlineData("trace.txt", "1.5 2\n1.4 3\n")]
    public void Delimited_extensions_go_to_the_delimited_reader(string name, string text)
    {
        File.WriteAllText(PathOf(name), text);

        var t = SpectrumFiles.Read(PathOf(name));

        Assert.Equal([1.5, 1.4], t.ShiftPpm);
        Assert.Equal([2.0, 3.0], t.Intensity);
        Assert.Equal("delimited text", t.Origin.Format);
    }

    [Fact]
    public void Unknown_extension_is_refused()
    {
        var e = Assert.Throws<SpectrumFileException>(() => SpectrumFiles.Read(PathOf("trace.xlsx")));

        Assert.Contains(".jdx", e.Problem);
    }

    [Fact]
    public void Summary_json_has_the_snake_case_keys()
    {
        var trace = JcampReader.Parse(JcampSamples.Write(JcampSamples.Synthetic(1001), JcampForm.DifDup), "s.jdx");

        var summary = TraceSummary.From(trace);
        using var json = JsonDocument.Parse(summary.ToJson());
        var root = json.RootElement;

        Assert.Equal(
            ["format", "form", "points", "ppm_first", "ppm_last", "hz_first", "hz_last", "observe_mhz", "nucleus", "y_min", "y_max", "warnings", "kind", "processing", "reference_ppm_shift"],
            root.EnumerateObject().Select(p => p.Name));
        Assert.Equal(1001, root.GetProperty("points").GetInt32());
        Assert.Equal(10.0, root.GetProperty("ppm_first").GetDouble(), 1e-12);
        Assert.Equal(-0.5, root.GetProperty("ppm_last").GetDouble(), 1e-12);
        Assert.Equal(4001.3, root.GetProperty("hz_first").GetDouble(), 1e-9);
        Assert.Equal(400.13, root.GetProperty("observe_mhz").GetDouble());
        Assert.Equal("1H", root.GetProperty("nucleus").GetString());
        Assert.Equal(JsonValueKind.Array, root.GetProperty("warnings").ValueKind);
        Assert.Equal(trace.Intensity.Max(), summary.YMax);
        Assert.Contains("points: 1001", summary.ToText());
    }

    [Fact]
    public void Summary_without_observe_frequency_has_null_hz()
    {
        var trace = new SpectrumTrace([2, 1], [5, 6], null, "1H", TraceOrigin.Describe("x"));

        using var json = JsonDocument.Parse(TraceSummary.From(trace).ToJson(indented: false));

        Assert.Equal(JsonValueKind.Null, json.RootElement.GetProperty("hz_first").ValueKind);
        Assert.Equal(JsonValueKind.Null, json.RootElement.GetProperty("observe_mhz").ValueKind);
    }
}
