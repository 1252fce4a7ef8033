using System.Diagnostics;
using SpinSim.Figures;
using SpinSim.Figures.Plots;

namespace SpinSim.Tests.Figures;

/// <summary>
/// Figures must carry text on a machine without fonts. The outer test reruns the inner one in a private mount
/// namespace where an empty tmpfs hides /usr/share/fonts, the folder the Skia build scans; there the stock
/// OxyPlot exporter throws. Skipped, with the reason, where unprivileged namespaces are not available.
/// </summary>
public sealed class NoSystemFontsTests
{
    private const string InsideVariable = "SPINSIM_INSIDE_NO_FONTS";
    private const string FontFolder = "/usr/share/fonts";

    [Fact]
    public void Every_format_renders_with_text()
    {
        if (Environment.GetEnvironmentVariable(InsideVariable) == "1")
            Assert.Empty(Directory.Exists(FontFolder) ? Directory.EnumerateFiles(FontFolder, "*", SearchOption.AllDirectories) : []);

        var options = new FigureOptions { WidthMm = 100, HeightMm = 60, Dpi = 150 };
        var model = SpectrumFigure.Simulated(FigureSamples.Trace(points: 2000), null, FigureSamples.Labels(), options);
        var png = FigureRenderer.Render(model, FigureFormat.Png, options);
        Assert.NotEmpty(FigureRenderer.Render(model, FigureFormat.Svg, options));
        Assert.NotEmpty(FigureRenderer.Render(model, FigureFormat.Pdf, options));

        using var probe = new PixelProbe(png, model, options.Dpi);
        var area = probe.PlotArea;
        var text = probe.Count(new(area.Left, area.Bottom + 3, area.Right, probe.Height), PixelProbe.IsDark);
        Assert.True(text > 300, $"only {text} dark pixels where the axis labels should be");
    }

    [NoFontsFact]
    public void Every_format_renders_with_text_when_the_system_has_no_fonts()
    {
        var assembly = typeof(NoSystemFontsTests).Assembly.Location;
        var filter = $"FullyQualifiedName={typeof(NoSystemFontsTests).FullName}.{nameof(Every_format_renders_with_text)}";
        var folder = Directory.CreateTempSubdirectory("spinsim-nofonts-").FullName;
        try
        {
            var start = new ProcessStartInfo(NoFontsFactAttribute.Unshare,
                ["-rm", "sh", "-c", $"mount -t tmpfs none {FontFolder} && exec dotnet test \"$0\" --filter \"$1\" --nologo", assembly, filter])
            {
                WorkingDirectory = folder,
                RedirectStandardOutput = true,
                RedirectStandardError = true,
            };
            start.Environment[InsideVariable] = "1";
            using var process = Process.Start(start)!;
            var output = process.StandardOutput.ReadToEndAsync();
            var errors = process.StandardError.ReadToEndAsync();
            Assert.True(process.WaitForExit(180_000), "the inner test run did not finish within three minutes");
            Assert.True(process.ExitCode == 0, $"inner run failed ({process.ExitCode}):\n{output.Result}\n{errors.Result}");
            Assert.Matches(@"Passed:\s+1\b", output.Result);
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }
}

/// <summary>Runs only where unshare can give an unprivileged process its own mount namespace, and never inside one.</summary>
public sealed class NoFontsFactAttribute : FactAttribute
{
    public const string Unshare = "/usr/bin/unshare";

    public NoFontsFactAttribute()
    {
        if (Environment.GetEnvironmentVariable("SPINSIM_INSIDE_NO_FONTS") == "1")
            Skip = "already inside the no-fonts namespace";
        else if (!OperatingSystem.IsLinux() || !File.Exists(Unshare))
            Skip = $"needs Linux and {Unshare} to hide the system fonts";
        else if (!CanUnshare())
            Skip = "unprivileged user and mount namespaces are not available here (unshare -rm failed)";
    }

    private static bool CanUnshare()
    {
        try
        {
            using var p = Process.Start(new ProcessStartInfo(Unshare, ["-rm", "true"]) { RedirectStandardError = true })!;
            return p.WaitForExit(10_000) && p.ExitCode == 0;
        }
        catch (System.ComponentModel.Win32Exception)
        {
            return false;
        }
    }
}
