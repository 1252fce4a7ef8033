using System.CommandLine;
using System.Globalization;
using SpinSim.Core.Processing;
using SpinSim.Core.Traces;
using SpinSim.Formats;
using SpinSim.Formats.Delimited;
using SpinSim.Formats.Fitting;

namespace SpinSim.Cli.Commands;

/// <summary>Options that say how an FID becomes a spectrum, and which known line sets the ppm scale; shared by every command that reads measured data.</summary>
public sealed class ProcessingChoice
{
    public Option<string?> Window { get; } = new("--window") { Description = "FID weighting before the transform: exponential (default), gaussian or none" };
    public Option<double?> WindowHz { get; } = new("--window-hz") { Description = "Line broadening the FID window adds, Hz (default 0.3 exponential, 1.0 Gaussian)" };
    public Option<int?> Points { get; } = new("--points") { Description = "FID zero-filled to this many complex points, a power of two (default: twice the acquired points, at least 65536)" };
    public Option<string?> Phase { get; } = new("--phase") { Description = "FID phase in degrees as ZERO,FIRST (zero order at the window's centre, first order across the window); default: found automatically" };
    public Option<double?> FilterDelay { get; } = new("--filter-delay") { Description = "Digital-filter delay of the FID in points (default: from the file, else found from the data)" };
    public Option<int?> BaselineOrder { get; } = new("--baseline-order") { Description = "Remove a polynomial baseline of this order (0-5) after phasing an FID (default: none)" };
    public Option<string?> SetShift { get; } = new("--set-shift")
    {
        Description = "Re-reference: SEEN=TRUE moves the ppm axis so that the line seen near SEEN ppm lies at TRUE ppm (e.g. 0.02=0 for TMS)",
    };

    public void AddTo(Command command)
    {
        foreach (var o in new Option[] { Window, WindowHz, Points, Phase, FilterDelay, BaselineOrder, SetShift }) command.Options.Add(o);
    }

    /// <summary>The values given on the command line; null where none was given.</summary>
    public MeasuredDataSettings Read(ParseResult parse)
    {
        var settings = new MeasuredDataSettings
        {
            WindowHz = parse.GetValue(WindowHz),
            Points = parse.GetValue(Points),
            FilterDelayPoints = parse.GetValue(FilterDelay),
            BaselineOrder = parse.GetValue(BaselineOrder),
        };
        if (parse.GetValue(Window) is { } w)
            settings = settings with { Window = MeasuredDataSettings.ParseWindow(w) ?? throw new UserInputException("--window", $"\"{w}\" is not known", "Use exponential, gaussian or none") };
        if (parse.GetValue(Phase) is { } phase)
        {
            var (p0, p1) = Pair(phase, ',', "--phase", "ZERO,FIRST in degrees, e.g. --phase 120.5,-340");
            settings = settings with { ZeroOrderPhaseDeg = p0, FirstOrderPhaseDeg = p1 };
        }
        if (parse.GetValue(SetShift) is { } set)
        {
            var (seen, truth) = Pair(set, '=', "--set-shift", "SEEN=TRUE in ppm, e.g. --set-shift 2.09=2.05");
            settings = settings with { Reference = new ReferenceLine(seen, truth) };
        }
        var problems = settings.Processing().Problems();
        if (problems.Count > 0) throw new UserInputException("FID processing options", string.Join("; ", problems));
        return settings;
    }

    /// <summary>Reads one measured-data file, processes it if it is an FID and re-references it if asked.</summary>
    public static SpectrumTrace ReadTrace(string path, DelimitedOptions delimited, MeasuredDataSettings settings)
    {
        var data = SpectrumFiles.ReadData(path, delimited);
        var trace = data.ToTrace(settings.Processing());
        if (settings.Reference is not { } line) return trace;
        try
        {
            return Referencing.SetLine(trace, line.SeenPpm, line.TruePpm);
        }
        catch (ArgumentException e)
        {
            throw new UserInputException(path, $"cannot set the reference line: {e.Message}", "Give the shift where the line is seen on the file's own scale (--set-shift SEEN=TRUE)");
        }
    }

    private static (double, double) Pair(string text, char separator, string option, string expected)
    {
        var parts = text.Split(separator, StringSplitOptions.TrimEntries);
        if (parts.Length == 2
            && double.TryParse(parts[0], NumberStyles.Float, CultureInfo.InvariantCulture, out var a) && double.IsFinite(a)
            && double.TryParse(parts[1], NumberStyles.Float, CultureInfo.InvariantCulture, out var b) && double.IsFinite(b))
            return (a, b);
        throw new UserInputException(option, $"\"{text}\" is not two numbers", $"Write {expected}");
    }
}
