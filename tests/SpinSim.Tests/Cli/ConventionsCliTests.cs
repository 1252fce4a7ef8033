namespace SpinSim.Tests.Cli;

/// <summary>The conventions every command shares: validation before work, exit codes, stdout and stderr, -v and -q, readable parse errors.</summary>
public class ConventionsCliTests
{
    private static string Temp(string ext) => Path.Combine(Path.GetTempPath(), $"spinsim-conv-{Guid.NewGuid():N}{ext}");

    [Theory]
    [InlineData("--phase-error", "500")]
    [InlineData("--dpi", "5")]
    [InlineData("--linewidth", "-1")]
    [InlineData("--spectrum", "out.gif")]
    public void A_bad_option_is_refused_before_anything_is_written(string option, string value)
    {
        var (figure, lines, spectrum) = (Temp(".png"), Temp(".csv"), Temp(".jdx"));
        var args = new List<string> { "simulate", CliTests.Example("vinyl.toml"), "--figure", figure, "--lines", lines };
        if (option != "--spectrum") args.AddRange(["--spectrum", spectrum]);
        args.AddRange([option, option == "--spectrum" ? Path.Combine(Path.GetTempPath(), value) : value]);
        var (code, o, err) = CliTests.Run(args.ToArray());
        Assert.Equal(1, code);
        Assert.Contains(option == "--dpi" ? "figure size" : option == "--spectrum" ? "out.gif" : option, err);
        Assert.Equal("", o);
        Assert.False(File.Exists(figure));
        Assert.False(File.Exists(lines));
        Assert.False(File.Exists(spectrum));
    }

    [Fact]
    public void Two_outputs_with_one_name_are_refused_before_work()
    {
        var same = Temp(".csv");
        var (code, _, err) = CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--lines", same, "--spectrum", same);
        Assert.Equal(1, code);
        Assert.Contains("named for two outputs", err);
        Assert.False(File.Exists(same));
    }

    [Fact]
    public void Fit_checks_the_bootstrap_count_before_fitting()
    {
        var data = Temp(".jdx");
        Assert.Equal(0, CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--spectrum", data, "--points", "4096").Code);
        var report = Temp(".json");
        var (code, o, err) = CliTests.Run("fit", CliTests.Example("vinyl.toml"), "--data", data, "--bootstrap", "1", "--report", report);
        Assert.Equal(1, code);
        Assert.Contains("--bootstrap", err);
        // Refused before the fit: no progress, no result, no report.
        Assert.DoesNotContain("iteration", err);
        Assert.Equal("", o);
        Assert.False(File.Exists(report));
        File.Delete(data);
    }

    [Fact]
    public void A_value_that_is_not_a_number_names_the_option_and_placeholder_not_a_dotnet_type()
    {
        var (code, _, err) = CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--field", "1.41T");
        Assert.Equal(2, code);
        Assert.Contains("--field <MHZ>: \"1.41T\" is not a number", err);
        Assert.DoesNotContain("System.", err);
        Assert.DoesNotContain("Nullable", err);
    }

    [Fact]
    public void Root_help_lists_the_exit_codes_and_command_help_uses_placeholders()
    {
        var (_, help, _) = CliTests.Run("--help");
        Assert.Contains("Exit codes: 0 success; 1 bad input", help);
        Assert.Contains("2 usage error", help);
        var (_, simulate, _) = CliTests.Run("simulate", "--help");
        Assert.Contains("--field <MHZ>", simulate);
        Assert.Contains("--figure <FILE>", simulate);
        Assert.Contains("--from <PPM>", simulate);
        Assert.Contains("-v, --verbose", simulate);
        Assert.Contains("-q, --quiet", simulate);
    }

    [Fact]
    public void Results_go_to_stdout_status_to_stderr_and_q_silences_status_only()
    {
        var lines = Temp(".csv");
        var (code, o, err) = CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--lines", lines);
        Assert.Equal(0, code);
        Assert.Contains("integrals", o);
        Assert.DoesNotContain("written", o);
        Assert.Contains($"written: {lines}", err);
        Assert.DoesNotContain("backend:", err);

        (code, o, err) = CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "--lines", lines, "-q");
        Assert.Equal(0, code);
        Assert.Contains("integrals", o);
        Assert.Equal("", err);

        (code, _, err) = CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "-v");
        Assert.Equal(0, code);
        Assert.Contains("backend:", err);
        (code, _, err) = CliTests.Run("simulate", CliTests.Example("vinyl.toml"), "-v", "-q");
        Assert.Equal(1, code);
        Assert.Contains("exclude each other", err);
        File.Delete(lines);
    }

    [Fact]
    public void A_field_typed_in_tesla_is_simulated_with_a_warning_that_suggests_field_tesla()
    {
        var path = Temp(".toml");
        File.WriteAllText(path, File.ReadAllText(CliTests.Example("vinyl.toml")).Replace("field_mhz = 60", "field_mhz = 7.05"));
        var (code, o, err) = CliTests.Run("simulate", path);
        Assert.Equal(0, code);
        Assert.Contains("warning: " + path + ", line ", err);
        Assert.Contains("field_tesla = 7.05", err);
        Assert.DoesNotContain("warning", o);
        (code, _, err) = CliTests.Run("simulate", path, "--field", "7.05");
        Assert.Equal(0, code);
        Assert.Contains("warning: --field: the field is 7.05 MHz", err);
        File.Delete(path);
    }
}
