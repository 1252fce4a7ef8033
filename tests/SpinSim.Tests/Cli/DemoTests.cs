using System.Text.Json;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Cli;

/// <summary>The demo, run afresh, reproduces the committed demo-output/ numbers.</summary>
public class DemoTests
{
    [Fact]
    public void DemoReproducesTheCommittedSummary()
    {
        var root = ReferenceData.RepositoryRoot;
        var committed = Path.Combine(root, "demo-output", "summary.json");
        Assert.True(File.Exists(committed), "demo-output/summary.json is missing: run `dotnet run -c Release --project src/SpinSim.Cli -- demo` and commit it");
        var outDir = Path.Combine(Path.GetTempPath(), $"spinsim-demo-{Guid.NewGuid():N}");
        var (code, _, err) = CliTests.Run("demo", "--out", outDir, "--systems", Path.Combine(root, "spin-systems"));
        Assert.True(code == 0, err);

        using var expected = JsonDocument.Parse(File.ReadAllText(committed));
        using var actual = JsonDocument.Parse(File.ReadAllText(Path.Combine(outDir, "summary.json")));

        // Line counts: exactly equal (same engine, same files).
        var expectedLines = expected.RootElement.GetProperty("simulated").EnumerateArray().ToDictionary(s => s.GetProperty("system").GetString()!, s => s.GetProperty("lines").GetInt32());
        var actualLines = actual.RootElement.GetProperty("simulated").EnumerateArray().ToDictionary(s => s.GetProperty("system").GetString()!, s => s.GetProperty("lines").GetInt32());
        Assert.Equal(expectedLines, actualLines);

        // Data lines of the simulated systems: the same text (they come from the input values alone).
        string?[] DataLines(JsonDocument d) => d.RootElement.GetProperty("simulated").EnumerateArray().Select(s => s.GetProperty("data_line").GetString()).ToArray();
        Assert.Equal(DataLines(expected), DataLines(actual));
        Assert.True(File.Exists(Path.Combine(outDir, "data-lines.txt")));

        // Fitted values: within 1e-6 relative or 1e-9 absolute, and within a tenth of their standard error.
        var expectedFits = expected.RootElement.GetProperty("fits").EnumerateArray().ToList();
        var actualFits = actual.RootElement.GetProperty("fits").EnumerateArray().ToList();
        Assert.Equal(expectedFits.Count, actualFits.Count);
        for (var f = 0; f < expectedFits.Count; f++)
        {
            Assert.True(actualFits[f].GetProperty("converged").GetBoolean());
            var e = expectedFits[f].GetProperty("parameters").EnumerateArray().ToList();
            var a = actualFits[f].GetProperty("parameters").EnumerateArray().ToList();
            Assert.Equal(e.Count, a.Count);
            for (var k = 0; k < e.Count; k++)
            {
                Assert.Equal(e[k].GetProperty("name").GetString(), a[k].GetProperty("name").GetString());
                var ev = e[k].GetProperty("value").GetDouble();
                var av = a[k].GetProperty("value").GetDouble();
                Assert.True(Math.Abs(ev - av) <= Math.Max(1e-6 * Math.Abs(ev), 1e-9), $"{e[k].GetProperty("name")}: committed {ev}, now {av}");
            }
        }
        Directory.Delete(outDir, recursive: true);
    }
}
