using System.Text.Json;
using System.Xml.Linq;
using SpinSim.Formats.SpinSystems;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Cli;

public class FitCliTests
{
    private static string Temp(string ext) => Path.Combine(Path.GetTempPath(), $"spinsim-fit-{Guid.NewGuid():N}{ext}");

    /// <summary>A synthetic measured ABX trace (invented values) and a start file with shifts and couplings moved.</summary>
    private static (string Data, string Start) SyntheticAbx()
    {
        var data = Temp(".jdx");
        Assert.Equal(0, CliTests.Run("simulate", CliTests.Example("abx-stereocentre.toml"), "--spectrum", data, "--points", "8192", "--noise", "0.004", "--seed", "9").Code);
        var start = Temp(".toml");
        File.WriteAllText(start, File.ReadAllText(CliTests.Example("abx-stereocentre.toml"))
            .Replace("shift_ppm = 2.74", "shift_ppm = 2.84").Replace("j_hz = 8.9", "j_hz = 7.0"));
        return (data, start);
    }

    [Fact]
    public void FitWritesReportSystemFigureAndHtml()
    {
        var (data, start) = SyntheticAbx();
        var (report, system, figure, html) = (Temp(".json"), Temp(".toml"), Temp(".png"), Temp(".html"));
        var (code, o, err) = CliTests.Run("fit", start, "--data", data, "--starts", "2", "-q", "--report", report, "--write-system", system, "--figure", figure, "--html", html);
        Assert.True(code == 0, err + o);

        using var json = JsonDocument.Parse(File.ReadAllText(report));
        var root = json.RootElement;
        Assert.True(root.GetProperty("converged").GetBoolean());
        Assert.True(root.GetProperty("rms").GetDouble() < 0.01);
        // The reports agree with each other: the JSON's starts_joined is the HTML's (checked below).
        var joined = root.GetProperty("starts_joined").GetInt32();
        Assert.Equal(JsonValueKind.Null, root.GetProperty("bootstrap").ValueKind);
        var parameters = root.GetProperty("parameters").EnumerateArray().ToList();
        var jbx = parameters.Single(p => p.GetProperty("name").GetString() == "j:HB-HX");
        Assert.Equal("j_hz", jbx.GetProperty("kind").GetString());
        Assert.Equal(["HB", "HX"], jbx.GetProperty("nuclei").EnumerateArray().Select(n => n.GetString()!).ToArray());
        Assert.Equal(8.9, jbx.GetProperty("value").GetDouble(), 0.02);
        Assert.True(jbx.GetProperty("std_error").GetDouble() > 0);
        Assert.Contains(parameters, p => p.GetProperty("kind").GetString() == "linewidth_hz" && p.GetProperty("nuclei").GetArrayLength() == 0);

        // The best-fit system is a file that simulate accepts.
        Assert.Equal(8.9, SpinSystemFiles.Read(system).System.Couplings.Single(c => c.A == "HB").J.Value, 0.02);
        Assert.Equal(0, CliTests.Run("simulate", system).Code);

        Assert.True(new FileInfo(figure).Length > 1000);
        var page = File.ReadAllText(html);
        XDocument.Parse(page[page.IndexOf("<html", StringComparison.Ordinal)..]);
        Assert.Contains("J(HB,HX)/Hz", page);
        Assert.Matches($@"starts that joined another's path</t[dh]>\s*<td[^>]*>{joined}<", page);
        Assert.Contains("<svg", page);
        // The data line: in the text after the table, in the JSON and in the page (ABX: first order does not hold).
        var line = root.GetProperty("report_line").GetString()!;
        Assert.StartsWith("¹H NMR (100 MHz): δ 4.08", line);
        Assert.Contains("(ABX part, 1H, J = −16.", line);
        Assert.Contains($"data line: {line}", o);
        Assert.Contains(line, page);
        foreach (var f in new[] { data, start, report, system, figure, html }) File.Delete(f);
    }

    [Fact]
    public void FitSetupInTheSystemFileIsUsedAndChecked()
    {
        var (data, start) = SyntheticAbx();
        File.AppendAllText(start, "\n[fit]\nregions_ppm = [[4.4, 3.8], [3.0, 2.3]]\nfix = [\"j:HA-HB\"]\nstarts = 1\n");
        var (code, o, err) = CliTests.Run("fit", start, "--data", data, "-q");
        Assert.True(code == 0, err);
        Assert.Matches(@"J\(HA,HB\)/Hz\s+-16\.400 \(fixed\)", o);

        File.AppendAllText(start, "tie = [[\"shift:HA\", \"shift:HQ\"]]\n");
        (code, _, err) = CliTests.Run("fit", start, "--data", data, "-q");
        Assert.Equal(1, code);
        Assert.Contains(start + ", line ", err);
        Assert.Contains("\"shift:HQ\" names no parameter", err);
        File.Delete(data);
        File.Delete(start);
    }

    /// <summary>
    /// --bootstrap N adds block-bootstrap errors to the text, the JSON report and the table; the simulated noise is
    /// independent from point to point, so they come out close to the covariance errors.
    /// </summary>
    [Fact]
    public void BootstrapErrorsAreReported()
    {
        var (data, start) = SyntheticAbx();
        var report = Temp(".json");
        var (code, o, err) = CliTests.Run("fit", start, "--data", data, "--starts", "1", "-q", "--bootstrap", "20", "--report", report);
        Assert.True(code == 0, err + o);
        Assert.Contains("±: the block-bootstrap standard error", o);
        using var json = JsonDocument.Parse(File.ReadAllText(report));
        var bootstrap = json.RootElement.GetProperty("bootstrap");
        Assert.Equal(20, bootstrap.GetProperty("replicates").GetInt32());
        // The synthetic noise is independent from point to point, so the residuals' autocorrelation falls below 1/e at
        // lag 1 and the block is BlocksPerCorrelationLength x 1 = 5 points (exact for white noise up to its sampling
        // scatter, about 0.01 at lag 1 for these 8192 points, far from 1/e).
        Assert.Equal(5, bootstrap.GetProperty("block_points").GetInt32());
        foreach (var p in json.RootElement.GetProperty("parameters").EnumerateArray().Where(p => p.GetProperty("kind").GetString() is "shift_ppm" or "j_hz"))
        {
            var ratio = p.GetProperty("bootstrap_std_error").GetDouble() / p.GetProperty("std_error").GetDouble();
            Assert.True(ratio is > 0.5 and < 2, $"{p.GetProperty("name").GetString()}: bootstrap / covariance = {ratio:0.00}");
        }
        Assert.Equal(1, CliTests.Run("fit", start, "--data", data, "-q", "--bootstrap", "1").Code);
        foreach (var f in new[] { data, start, report }) File.Delete(f);
    }

    [Fact]
    public void TheDataFieldWinsWithANoticeAndIsWrittenToTheBestFitSystem()
    {
        // Data simulated at 60 MHz (invented ABX), start file at 100 MHz.
        var data = Temp(".jdx");
        Assert.Equal(0, CliTests.Run("simulate", CliTests.Example("abx-stereocentre.toml"), "--field", "60", "--spectrum", data, "--points", "8192", "--noise", "0.004", "--seed", "3").Code);
        var system = Temp(".toml");
        var (code, o, err) = CliTests.Run("fit", CliTests.Example("abx-stereocentre.toml"), "--data", data, "--starts", "1", "-q", "--write-system", system);
        Assert.True(code == 0, err + o);
        Assert.Contains("was measured at 60 MHz and abx-stereocentre.toml says 100 MHz: the fit uses the data's field", err);
        Assert.Equal(60, SpinSystemFiles.Read(system).System.Field.Value, 6);
        File.Delete(data);
        File.Delete(system);
    }

    [Fact]
    public void AStartOutsideItsBoundsIsRefusedAtTheBoundsLine()
    {
        var (data, start) = SyntheticAbx();
        File.AppendAllText(start, "\n[fit.bounds]\n\"j:HB-HX\" = [8, 10]\n");
        var (code, _, err) = CliTests.Run("fit", start, "--data", data, "-q");
        Assert.Equal(1, code);
        Assert.Matches(@", line \d+: the start of j:HB-HX, 7, lies outside its bounds \[8, 10\]", err);
        File.Delete(data);
        File.Delete(start);
    }

    [Fact]
    public void AFirstOrderPhaseIsAskedForByItsKeyAndItsPivotIsStatedInEveryReport()
    {
        var (data, start) = SyntheticAbx();
        File.AppendAllText(start, "\n[fit]\nregions_ppm = [[4.3, 3.9], [2.9, 2.4]]\nfirst_order_phase = true\nstarts = 1\n");
        var (report, html) = (Temp(".json"), Temp(".html"));
        var (code, o, err) = CliTests.Run("fit", start, "--data", data, "-q", "--report", report, "--html", html);
        Assert.True(code == 0, err + o);
        // The pivot is the centre of the regions, (4.3 + 2.4) / 2.
        Assert.Contains("phase_deg_per_ppm turns each line by that many degrees per ppm of its distance from 3.35 ppm", o);
        Assert.Contains("phase slope/(°/ppm)", o);
        using var json = JsonDocument.Parse(File.ReadAllText(report));
        var setup = json.RootElement.GetProperty("setup");
        Assert.Equal(3.35, setup.GetProperty("traces")[0].GetProperty("phase_pivot_ppm").GetDouble(), 9);
        // Asking for the slope fits the zero-order phase too (a ramp needs its level).
        foreach (var name in new[] { "phase_deg", "phase_deg_per_ppm" })
            Assert.Contains(setup.GetProperty("parameters").EnumerateArray(), p => p.GetProperty("name").GetString() == name && p.GetProperty("varied").GetBoolean());
        Assert.Contains(json.RootElement.GetProperty("parameters").EnumerateArray(), p => p.GetProperty("kind").GetString() == "phase_deg_per_ppm");
        Assert.Contains("first-order phase", File.ReadAllText(html));
        foreach (var f in new[] { data, start, report, html }) File.Delete(f);
    }

    [Fact]
    public void AFitThatRunsOutOfIterationsExitsWithThreeAndStillWritesItsBestPoint()
    {
        var (data, start) = SyntheticAbx();
        // One iteration per stage cannot take a start 10 Hz and 1.9 Hz off to the optimum.
        File.AppendAllText(start, "\n[fit]\nstarts = 1\nmax_iterations = 1\n");
        var (report, system) = (Temp(".json"), Temp(".toml"));
        var (code, o, err) = CliTests.Run("fit", start, "--data", data, "-q", "--report", report, "--write-system", system);
        Assert.True(code == 3, $"exit {code}: {err}{o}");
        using var json = JsonDocument.Parse(File.ReadAllText(report));
        Assert.False(json.RootElement.GetProperty("converged").GetBoolean());
        Assert.True(json.RootElement.GetProperty("rms").GetDouble() <= json.RootElement.GetProperty("start_rms").GetDouble());
        // The best point reached is written as a system file that simulate accepts, like a converged one.
        Assert.Equal(0, CliTests.Run("simulate", system).Code);
        foreach (var f in new[] { data, start, report, system }) File.Delete(f);
    }

    [Fact]
    public void ASetupThatVariesNothingGivesTheOverlayWithItsRms()
    {
        var (data, start) = SyntheticAbx();
        File.AppendAllText(start, "\n[fit]\nvary = []\n");
        var report = Temp(".json");
        var (code, o, err) = CliTests.Run("fit", start, "--data", data, "-q", "--report", report);
        Assert.True(code == 0, err + o);
        Assert.Contains("nothing varied: the simulation at the given values compared with the data", o);
        using var json = JsonDocument.Parse(File.ReadAllText(report));
        Assert.True(json.RootElement.GetProperty("overlay").GetBoolean());
        Assert.True(json.RootElement.GetProperty("rms").GetDouble() > 0);
        foreach (var f in new[] { data, start, report }) File.Delete(f);
    }

    [Fact]
    public void MissingDataIsAUsageError() => Assert.Equal(2, CliTests.Run("fit", CliTests.Example("vinyl.toml")).Code);

    [Fact]
    public void DataOutsideTheSystemsRangeIsExplained()
    {
        var data = Temp(".csv");
        File.WriteAllText(data, "shift_ppm,intensity\n" + string.Join("\n", Enumerable.Range(0, 200).Select(i => $"{9 + i * 0.001},{i % 7}")));
        var (code, _, err) = CliTests.Run("fit", CliTests.Example("vinyl.toml"), "--data", data, "-q");
        Assert.Equal(1, code);
        Assert.Contains("points of the trace lie in the fitted regions", err);
        File.Delete(data);
    }

    [ReferenceFact]
    public void RealMeasuredAbxOfTheSharedRutinSpectrumFitsWithPlausibleCouplings()
    {
        // Source: rutin-1h-400mhz-link.jdx (../shared/reference-data/jcamp, SOURCES.md: a real measured ABX-type system of the
        // B ring near 7.51, 7.49 and 6.80 ppm, referencing off by about -0.04 ppm). Expected magnitudes are common practice,
        // no source: aromatic ortho 7 to 9 Hz, meta 1 to 3 Hz, para below 1 Hz.
        var start = Temp(".toml");
        File.WriteAllText(start, """
            title = "B-ring ABX of the shared measured spectrum"
            field_mhz = 399.782198
            linewidth_hz = 1.0
            [[nucleus]]
            id = "H2'"
            shift_ppm = 7.49
            [[nucleus]]
            id = "H6'"
            shift_ppm = 7.47
            [[nucleus]]
            id = "H5'"
            shift_ppm = 6.78
            [[coupling]]
            between = ["H5'", "H6'"]
            j_hz = 8.0
            [[coupling]]
            between = ["H2'", "H6'"]
            j_hz = 2.0
            [[coupling]]
            between = ["H2'", "H5'"]
            j_hz = 0.2
            [fit]
            regions_ppm = [[7.60, 7.38], [6.90, 6.70]]
            baseline_order = 1
            phase = true
            starts = 8
            """);
        var (report, html) = (Temp(".json"), Temp(".html"));
        var (code, _, err) = CliTests.Run("fit", start, "--data", ReferenceData.PathOf("jcamp", "rutin-1h-400mhz-link.jdx"), "-q", "--report", report, "--html", html);
        Assert.True(code == 0, err);
        using var json = JsonDocument.Parse(File.ReadAllText(report));
        // The report holds the setup needed to rerun the fit: the regions as given, the field from the data, the command.
        Assert.Equal(3, json.RootElement.GetProperty("schema_version").GetInt32());
        var setup = json.RootElement.GetProperty("setup");
        var trace = setup.GetProperty("traces")[0];
        Assert.False(trace.GetProperty("regions_automatic").GetBoolean());
        Assert.Equal([[7.60, 7.38], [6.90, 6.70]], trace.GetProperty("regions_ppm").EnumerateArray()
            .Select(r => r.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray());
        Assert.Equal(399.782198, trace.GetProperty("field_mhz").GetDouble(), 3);
        Assert.Equal(8, setup.GetProperty("starts").GetInt32());
        Assert.StartsWith("spinsim fit ", setup.GetProperty("command_line").GetString());
        Assert.Contains(setup.GetProperty("parameters").EnumerateArray(), p => p.GetProperty("name").GetString() == "phase_deg" && p.GetProperty("varied").GetBoolean());
        var page = File.ReadAllText(html);
        Assert.Contains("Setup (enough to run the fit again)", page);
        Assert.Contains("regions (given)", page);
        File.Delete(html);
        Assert.True(json.RootElement.GetProperty("converged").GetBoolean());
        Assert.True(json.RootElement.GetProperty("r_factor").GetDouble() < 0.1);
        double Value(string name) => json.RootElement.GetProperty("parameters").EnumerateArray()
            .Single(p => p.GetProperty("name").GetString() == name).GetProperty("value").GetDouble();
        Assert.InRange(Math.Abs(Value("j:H5'-H6'")), 7, 9);
        Assert.InRange(Math.Abs(Value("j:H2'-H6'")), 1, 3);
        Assert.InRange(Math.Abs(Value("j:H2'-H5'")), 0, 1);
        Assert.InRange(Value("shift:H5'"), 6.75, 6.85);
        // The report states each coupling's relative sign, and what the sign search tried (H2' and H6' are strongly
        // coupled at 400 MHz, so all three couplings touch that cluster and 2^(3-1) - 1 patterns are tried).
        foreach (var name in new[] { "j:H5'-H6'", "j:H2'-H6'", "j:H2'-H5'" })
        {
            var p = json.RootElement.GetProperty("parameters").EnumerateArray().Single(q => q.GetProperty("name").GetString() == name);
            Assert.Contains(p.GetProperty("relative_sign").GetString(), new[] { "determined", "undetermined" });
        }
        Assert.Equal(3, json.RootElement.GetProperty("solutions").GetProperty("sign_patterns_tried").GetInt32());
        // An alternative solution differs in more than signs (a pure sign variant is the sign report's, not a second
        // solution: on this spectrum the sign search reaches J(H2',H6') reversed at a misfit ratio of about 1.004).
        double StdError(string name) => json.RootElement.GetProperty("parameters").EnumerateArray()
            .Single(p => p.GetProperty("name").GetString() == name).GetProperty("std_error").GetDouble();
        foreach (var alternative in json.RootElement.GetProperty("solutions").GetProperty("alternatives").EnumerateArray())
            Assert.Contains(alternative.GetProperty("differences").EnumerateArray(), d => !d.GetProperty("name").GetString()!.StartsWith("j:", StringComparison.Ordinal)
                || Math.Abs(Math.Abs(d.GetProperty("best").GetDouble()) - Math.Abs(d.GetProperty("alternative").GetDouble())) > StdError(d.GetProperty("name").GetString()!));
        File.Delete(start);
        File.Delete(report);
    }
}
