using System.Text.Json;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Cli;

/// <summary>FIDs, re-referencing and the look at the data, through the command line, on the public naphthoic-acid pair.</summary>
public class MeasuredDataCliTests
{
    private static string Jcamp(string name) => ReferenceData.PathOf("jcamp", name);

    private static string Start => Path.Combine(ReferenceData.RepositoryRoot, "spin-systems", "measured", "naphthoic-acid-h8.toml");

    private static Dictionary<string, (double Value, double Error)> Fitted(string data, string report)
    {
        var (code, _, err) = CliTests.Run("fit", Start, "--data", data, "--quiet", "--report", report);
        Assert.True(code == 0, err);
        using var json = JsonDocument.Parse(File.ReadAllText(report));
        return json.RootElement.GetProperty("parameters").EnumerateArray()
            .Where(p => p.GetProperty("varied").GetBoolean())
            .ToDictionary(p => p.GetProperty("name").GetString()!, p => (p.GetProperty("value").GetDouble(), p.GetProperty("std_error").GetDouble()));
    }

    [ReferenceFact]
    public void Fid_fits_in_one_command_to_the_values_of_the_processed_spectrum()
    {
        var dir = Directory.CreateTempSubdirectory("spinsim-fid").FullName;
        var fromFid = Fitted(Jcamp("naphthoic-acid-1h-500mhz-fid.dx"), Path.Combine(dir, "fid.json"));
        // The same FID as processed by its instrument's software (the shared pair).
        var fromInstrument = Fitted(Jcamp("naphthoic-acid-1h-500mhz-spectrum.dx"), Path.Combine(dir, "instrument.json"));
        // The same FID as processed by SpinSim and written out by inspect --spectrum.
        var written = Path.Combine(dir, "processed.jdx");
        Assert.Equal(0, CliTests.Run("inspect", Jcamp("naphthoic-acid-1h-500mhz-fid.dx"), "--spectrum", written).Code);
        var fromWritten = Fitted(written, Path.Combine(dir, "written.json"));

        foreach (var name in new[] { "shift:H8", "j:H8-H7" })
        {
            var (a, ea) = fromFid[name];
            foreach (var (b, eb) in new[] { fromInstrument[name], fromWritten[name] })
            {
                // Same values within their combined standard errors (2 sigma).
                var allowed = 2 * Math.Sqrt(ea * ea + eb * eb);
                Assert.True(Math.Abs(a - b) <= allowed, $"{name}: {a} from the FID, {b} from the spectrum, allowed {allowed}");
            }
        }
        using var report = JsonDocument.Parse(File.ReadAllText(Path.Combine(dir, "fid.json")));
        var data = report.RootElement.GetProperty("data")[0];
        Assert.Equal("fid", data.GetProperty("kind").GetString());
        Assert.Contains(data.GetProperty("processing").EnumerateArray(), s => s.GetProperty("step").GetString() == "phase");
        Directory.Delete(dir, true);
    }

    [ReferenceFact]
    public void Inspect_json_says_kind_processing_and_reference_shift()
    {
        // Acetone-d6's residual CHD2 line lies at 2.05 ppm (H. E. Gottlieb, V. Kotlyar, A. Nudelman, J. Org. Chem. 62,
        // 7512, 1997, from memory); the file's own scale puts it near 2.09.
        var (code, output, err) = CliTests.Run("inspect", Jcamp("naphthoic-acid-1h-500mhz-fid.dx"), "--json", "--set-shift", "2.09=2.05");
        Assert.True(code == 0, err);
        using var json = JsonDocument.Parse(output);
        var root = json.RootElement;
        Assert.Equal("fid", root.GetProperty("kind").GetString());
        var shift = root.GetProperty("reference_ppm_shift").GetDouble();
        Assert.InRange(shift, -0.045, -0.035);
        var steps = root.GetProperty("processing").EnumerateArray().ToArray();
        Assert.Contains("minimum entropy", steps.Single(s => s.GetProperty("step").GetString() == "phase").GetProperty("how").GetString());
        Assert.Equal("reference", steps[^1].GetProperty("step").GetString());

        (code, output, err) = CliTests.Run("inspect", Jcamp("naphthoic-acid-1h-500mhz-fid.dx"), "--json", "--phase", "125,-340", "--filter-delay", "54");
        Assert.True(code == 0, err);
        using var given = JsonDocument.Parse(output);
        var values = given.RootElement.GetProperty("processing").EnumerateArray().Single(s => s.GetProperty("step").GetString() == "phase").GetProperty("values");
        Assert.Equal(125, values.GetProperty("zero_order_deg").GetDouble());
        Assert.Equal(-340, values.GetProperty("first_order_deg").GetDouble());
        Assert.Equal(0, given.RootElement.GetProperty("reference_ppm_shift").GetDouble());
    }

    [ReferenceFact]
    public void Inspect_draws_the_chosen_range_and_refuses_one_outside()
    {
        var figure = Path.Combine(Path.GetTempPath(), $"fid-{Guid.NewGuid():N}.png");
        var (code, _, err) = CliTests.Run("inspect", Jcamp("naphthoic-acid-1h-500mhz-fid.dx"), "--figure", figure, "--from", "9.3", "--to", "7.3");
        Assert.True(code == 0, err);
        Assert.True(new FileInfo(figure).Length > 1000);
        File.Delete(figure);
        var (refused, _, message) = CliTests.Run("inspect", Jcamp("naphthoic-acid-1h-500mhz-fid.dx"), "--figure", figure, "--from", "80", "--to", "90");
        Assert.Equal(1, refused);
        Assert.Contains("no part of the trace", message);
        Assert.False(File.Exists(figure));
    }

    [Fact]
    public void Bad_processing_options_name_the_option()
    {
        var (code, _, err) = CliTests.Run("inspect", "nothing.jdx", "--points", "1000");
        Assert.Equal(1, code);
        Assert.Contains("power of two", err);
        (code, _, err) = CliTests.Run("inspect", "nothing.jdx", "--set-shift", "2.09");
        Assert.Equal(1, code);
        Assert.Contains("--set-shift", err);
    }
}
