using SpinSim.Cli;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Cli;

public class CliTests
{
    internal static (int Code, string Out, string Err) Run(params string[] args)
    {
        var o = new StringWriter();
        var e = new StringWriter();
        var code = SpinSimCli.Run(args, o, e);
        return (code, o.ToString(), e.ToString());
    }

    internal static string Example(string name) => Path.Combine(ReferenceData.RepositoryRoot, "spin-systems", name);

    [Fact]
    public void NoArguments_PrintsTheHelp()
    {
        var (code, output, _) = Run();
        Assert.Equal(0, code);
        Assert.Contains("Usage:", output);
        Assert.Contains("simulate", output);
    }

    [Fact]
    public void EveryExampleSystem_IsBuiltIntoTheProgram_ForTheDemo()
    {
        // The demo runs from any folder on these: byte for byte the repository's spin-systems/ files (exact invariant).
        var assembly = typeof(SpinSim.Cli.Commands.DemoCommand).Assembly;
        foreach (var file in Directory.GetFiles(Path.Combine(ReferenceData.RepositoryRoot, "spin-systems"), "*.toml"))
        {
            using var stream = assembly.GetManifestResourceStream("Systems." + Path.GetFileName(file));
            Assert.True(stream is not null, $"{Path.GetFileName(file)} is not embedded");
            using var copy = new MemoryStream();
            stream!.CopyTo(copy);
            Assert.Equal(File.ReadAllBytes(file), copy.ToArray());
        }
    }

    [Fact]
    public void SimulateWritesTheLinesTableWithItsHeader()
    {
        var output = Path.Combine(Path.GetTempPath(), $"lines-{Guid.NewGuid():N}.csv");
        var (code, _, err) = Run("simulate", Example("abx-stereocentre.toml"), "--lines", output);
        Assert.True(code == 0, err);
        var lines = File.ReadAllLines(output);
        Assert.StartsWith("frequency_hz,shift_ppm,intensity", lines[0]);
        // ABX: 3 observed protons, total intensity N 2^(N-1) = 12.
        var total = lines.Skip(1).Sum(l => double.Parse(l.Split(',')[2], System.Globalization.CultureInfo.InvariantCulture));
        Assert.Equal(12.0, total, 6);
        File.Delete(output);
    }

    [Fact]
    public void FieldOptionOverridesTheFile()
    {
        var output = Path.Combine(Path.GetTempPath(), $"lines-{Guid.NewGuid():N}.csv");
        Assert.Equal(0, Run("simulate", Example("isopropyl.toml"), "--field", "600", "--lines", output).Code);
        var first = File.ReadAllLines(output)[1].Split(',');
        var hz = double.Parse(first[0], System.Globalization.CultureInfo.InvariantCulture);
        var ppm = double.Parse(first[1], System.Globalization.CultureInfo.InvariantCulture);
        Assert.Equal(600.0, hz / ppm, 4);
        File.Delete(output);
    }

    [Fact]
    public void CheckJsonPrintsTheMachineForm()
    {
        var (code, o, _) = Run("check", Example("vinyl.toml"), "--json");
        Assert.Equal(0, code);
        Assert.Contains("\"field_mhz\": 60", o);
        var path = Path.Combine(Path.GetTempPath(), $"sys-{Guid.NewGuid():N}.json");
        File.WriteAllText(path, o);
        Assert.Equal(0, Run("simulate", path).Code);
        File.Delete(path);
    }

    [Fact]
    public void CheckReportsCost()
    {
        var (code, o, _) = Run("check", Example("para-ring-aabb.toml"));
        Assert.Equal(0, code);
        Assert.Contains("largest block 6 states", o);
    }

    [Fact]
    public void BadInputIsExitCodeOneWithTheFileName()
    {
        var path = Path.Combine(Path.GetTempPath(), $"bad-{Guid.NewGuid():N}.toml");
        File.WriteAllText(path, "field_mhz = 400\n[[nucleus]]\nid = \"A\"\n");
        var (code, _, err) = Run("simulate", path);
        Assert.Equal(1, code);
        Assert.Contains(path + ", line 2:", err);
        Assert.Contains("shift_ppm", err);
        File.Delete(path);
    }

    [Fact]
    public void UsageErrorIsExitCodeTwo()
    {
        Assert.Equal(2, Run("simulate").Code);
        Assert.Equal(2, Run("simulate", Example("vinyl.toml"), "--no-such-option").Code);
    }

    [Fact]
    public void OutputNeverOverwritesTheInput()
    {
        var copy = Path.Combine(Path.GetTempPath(), $"in-{Guid.NewGuid():N}.toml");
        File.Copy(Example("vinyl.toml"), copy);
        var before = File.ReadAllText(copy);
        var (code, _, err) = Run("simulate", copy, "--lines", copy);
        Assert.Equal(1, code);
        Assert.Contains("overwrite", err);
        Assert.Equal(before, File.ReadAllText(copy));
        File.Delete(copy);
    }
}

public class InspectCliTests
{
    [ReferenceFact]
    public void InspectJsonStatesWhatWasRead()
    {
        // Source: isobutanol-1h-300mhz-sqzdif.jdx (../shared/reference-data/jcamp, SOURCES.md): 300.149506 MHz, 2,153 points,
        // x in PPM from 0.4499 to 3.9512.
        var (code, o, err) = CliTests.Run("inspect", ReferenceData.PathOf("jcamp", "isobutanol-1h-300mhz-sqzdif.jdx"), "--json");
        Assert.True(code == 0, err);
        using var json = System.Text.Json.JsonDocument.Parse(o);
        var root = json.RootElement;
        Assert.Equal(2153, root.GetProperty("points").GetInt32());
        Assert.Equal(300.149506, root.GetProperty("observe_mhz").GetDouble(), 6);
        Assert.Equal(0.4499, Math.Min(root.GetProperty("ppm_first").GetDouble(), root.GetProperty("ppm_last").GetDouble()), 3);
        Assert.Equal(3.9512, Math.Max(root.GetProperty("ppm_first").GetDouble(), root.GetProperty("ppm_last").GetDouble()), 3);
        Assert.Equal(System.Text.Json.JsonValueKind.Array, root.GetProperty("warnings").ValueKind);
    }

    [Fact]
    public void InspectOfADefectiveFileIsExitCodeOneWithFileAndLine()
    {
        var path = Path.Combine(Path.GetTempPath(), $"bad-{Guid.NewGuid():N}.csv");
        File.WriteAllText(path, "shift,intensity\n1.0,2.0\n1.1,abc\n");
        var (code, _, err) = CliTests.Run("inspect", path);
        Assert.Equal(1, code);
        Assert.Contains(path, err);
        Assert.Contains("line 3", err);
        File.Delete(path);
    }

    [Fact]
    public void InspectReadsDecimalCommaSemicolonText()
    {
        var path = Path.Combine(Path.GetTempPath(), $"dc-{Guid.NewGuid():N}.csv");
        File.WriteAllText(path, "ppm;int\n7,5;1,25\n7,4;2,5\n7,3;0,5\n");
        var (code, o, err) = CliTests.Run("inspect", path, "--separator", "semicolon", "--decimal-comma", "--json");
        Assert.True(code == 0, err);
        Assert.Contains("\"points\": 3", o);
        Assert.Contains("\"y_max\": 2.5", o);
        File.Delete(path);
    }
}
