using SpinSim.Core.Errors;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Formats.Fitting;

/// <summary>A fit setup that cannot be used: names the file, the line, and the fix.</summary>
public sealed class FitSetupException(string path, int? line, string problem, string fix) : InputException(path, line, problem, fix);

/// <summary>A fit setup as read, with the lineshape it asks for.</summary>
public sealed record FitSettings(FitSetup Setup, Lineshape? Shape);

/// <summary>
/// Interprets a [fit] section:
/// <code>
/// [fit]
/// regions_ppm = [[7.6, 6.8]]          # one or more [from, to]
/// exclude_ppm = [[7.27, 7.25]]        # solvent, impurity
/// vary = ["shift:*", "j:*", "linewidth", "scale", "baseline*"]
/// fix = ["j:HA-HA'"]
/// tie = [["shift:HA", "shift:HA'"]]
/// baseline_order = 1                  # 0 constant, 1 linear, up to 3
/// offset = true                       # small frequency offset per trace
/// phase = true                        # zero-order phase error per trace
/// first_order_phase = true            # also a first-order phase per trace, degrees per ppm about the regions' centre
/// linewidth_per_nucleus = false
/// starts = 8
/// max_iterations = 300                # per stage of each start; a fit that reaches it has not converged (exit code 3)
/// lineshape = "lorentzian"            # gaussian, voigt
/// shift_window_ppm = 0.3              # shifts stay this close to their start unless bounded below
/// hold_shifts_outside_regions = true  # false: vary shifts of nuclei with no line in the regions
/// tie_symmetric = true                # false: do not tie the nuclei of [[symmetry]] tables
/// linewidth_per_trace = true          # joint fits: one linewidth per trace (false: one for all)
/// [fit.bounds]
/// "shift:HA" = [7.2, 7.5]
/// </code>
/// Every parameter name is checked against the system's parameters.
/// </summary>
public static class FitSetupReader
{
    private static readonly string[] Keys =
        ["regions_ppm", "exclude_ppm", "vary", "fix", "hold_sign", "tie", "baseline_order", "offset", "phase", "first_order_phase", "linewidth_per_nucleus", "starts", "max_iterations", "lineshape",
         "shift_window_ppm", "hold_shifts_outside_regions", "tie_symmetric", "linewidth_per_trace", "set_shift_ppm"];

    private static readonly string[] FidKeys = ["window", "window_hz", "points", "filter_delay_points", "phase_deg", "baseline_order"];

    /// <summary>
    /// The measured-data part of a [fit] section: <c>set_shift_ppm = [seen, true]</c> in [fit], and the FID processing in
    /// [fit.fid] (<c>window</c>, <c>window_hz</c>, <c>points</c>, <c>filter_delay_points</c>, <c>phase_deg = [zero, first]</c>,
    /// <c>baseline_order</c>). Values are checked here; missing ones stay null.
    /// </summary>
    public static MeasuredDataSettings ReadMeasuredData(FitSection? section)
    {
        var settings = new MeasuredDataSettings();
        if (section is null) return settings;
        var path = section.Path;
        foreach (var e in section.Entries)
        {
            if (e.Table == "fit" && e.Key == "set_shift_ppm")
            {
                var (seen, truth) = Pair(path, e, "set_shift_ppm = [2.09, 2.05]  # the line seen at 2.09 ppm is set to 2.05");
                settings = settings with { Reference = new ReferenceLine(seen, truth) };
                continue;
            }
            if (e.Table != "fit.fid") continue;
            switch (e.Key)
            {
                case "window":
                    var shape = e.Value is string w ? MeasuredDataSettings.ParseWindow(w) : null;
                    settings = settings with { Window = shape ?? throw new FitSetupException(path, e.Line, $"unknown window {e.Value}", "Use \"exponential\", \"gaussian\" or \"none\"") };
                    break;
                case "window_hz":
                    var hz = Number(path, e);
                    if (hz is < 0 or > 100) throw new FitSetupException(path, e.Line, $"window_hz is {hz}", "Use a width from 0 to 100 Hz");
                    settings = settings with { WindowHz = hz };
                    break;
                case "points":
                    var n = Number(path, e);
                    if (n < 16 || n > (1 << 22) || n != Math.Floor(n) || ((long)n & ((long)n - 1)) != 0)
                        throw new FitSetupException(path, e.Line, $"points is {n}", "Use a power of two such as 65536, at least the FID's point count");
                    settings = settings with { Points = (int)n };
                    break;
                case "filter_delay_points":
                    var d = Number(path, e);
                    if (d is < 0 or > 1000) throw new FitSetupException(path, e.Line, $"filter_delay_points is {d}", "Use a delay from 0 to 1000 points");
                    settings = settings with { FilterDelayPoints = d };
                    break;
                case "phase_deg":
                    var (p0, p1) = Pair(path, e, "phase_deg = [120.5, -340]  # zero order, first order in degrees");
                    settings = settings with { ZeroOrderPhaseDeg = p0, FirstOrderPhaseDeg = p1 };
                    break;
                case "baseline_order":
                    var b = Number(path, e);
                    if (b is < 0 or > 5 || b != Math.Floor(b)) throw new FitSetupException(path, e.Line, $"baseline_order is {b}", "Use a whole number from 0 to 5");
                    settings = settings with { BaselineOrder = (int)b };
                    break;
                default:
                    throw new FitSetupException(path, e.Line, $"unknown key \"{e.Key}\" in [fit.fid]", $"Allowed keys: {string.Join(", ", FidKeys)}");
            }
        }
        return settings;
    }

    public static FitSettings Read(FitSection? section, SpinSystem system, int traces, IReadOnlyList<MirrorSymmetry>? symmetries = null)
    {
        var setup = new FitSetup { Symmetries = symmetries ?? [] };
        if (section is null) return new FitSettings(setup, null);
        var path = section.Path;
        Lineshape? shape = null;
        var nameLines = new List<(string Name, int Line, bool Pattern)>();
        int? tieLine = null;
        var bounds = new Dictionary<string, (double, double)>();
        foreach (var e in section.Entries)
        {
            if (e.Table == "fit.fid" || (e.Table == "fit" && e.Key == "set_shift_ppm")) continue; // read by ReadMeasuredData
            if (e.Table == "fit.bounds")
            {
                var pair = Pair(path, e, $"\"{e.Key}\" = [low, high]");
                bounds[e.Key] = pair;
                nameLines.Add((e.Key, e.Line, false));
                continue;
            }
            if (e.Table != "fit")
                throw new FitSetupException(path, e.Line, $"unknown table [{e.Table}]", "Use [fit], [fit.bounds] and [fit.fid]");
            switch (e.Key)
            {
                case "regions_ppm": setup = setup with { Regions = Ranges(path, e) }; break;
                case "exclude_ppm": setup = setup with { Exclude = Ranges(path, e) }; break;
                case "vary":
                    setup = setup with { Vary = Strings(path, e) };
                    nameLines.AddRange(setup.Vary.Select(n => (n, e.Line, true)));
                    break;
                case "fix":
                    setup = setup with { Fix = Strings(path, e) };
                    nameLines.AddRange(setup.Fix.Select(n => (n, e.Line, true)));
                    break;
                case "hold_sign":
                    setup = setup with { HoldSign = Strings(path, e) };
                    nameLines.AddRange(setup.HoldSign.Select(n => (n, e.Line, true)));
                    break;
                case "tie":
                    if (e.Value is not object[] groups || groups.Any(g => g is not object[] inner || inner.Length < 2 || inner.Any(x => x is not string)))
                        throw new FitSetupException(path, e.Line, "tie must be a list of lists of parameter names", "Write tie = [[\"shift:HA\", \"shift:HA'\"]]");
                    var ties = groups.Select(g => (IReadOnlyList<string>)((object[])g).Cast<string>().ToArray()).ToArray();
                    setup = setup with { Ties = ties };
                    tieLine = e.Line;
                    nameLines.AddRange(ties.SelectMany(t => t).Select(n => (n, e.Line, false)));
                    break;
                case "baseline_order":
                    setup = setup with { BaselineOrder = WholeNumber(path, e, 0, 3, "Use 0 (constant), 1 (linear), 2 or 3") };
                    break;
                case "offset": setup = setup with { FitOffset = Bool(path, e) }; break;
                case "phase": setup = setup with { FitPhase = Bool(path, e) }; break;
                case "first_order_phase": setup = setup with { FitFirstOrderPhase = Bool(path, e) }; break;
                case "linewidth_per_nucleus": setup = setup with { PerNucleusWidth = Bool(path, e) }; break;
                case "hold_shifts_outside_regions": setup = setup with { HoldShiftsOutsideRegions = Bool(path, e) }; break;
                case "tie_symmetric": setup = setup with { TieSymmetric = Bool(path, e) }; break;
                case "linewidth_per_trace": setup = setup with { WidthPerTrace = Bool(path, e) }; break;
                case "shift_window_ppm":
                    var window = Number(path, e);
                    if (!(window > 0))
                        throw new FitSetupException(path, e.Line, $"shift_window_ppm is {window}", "Give a window above 0 ppm, for example 0.5");
                    setup = setup with { ShiftWindowPpm = window };
                    break;
                case "starts":
                    setup = setup with { Starts = WholeNumber(path, e, 1, 64, "Use a whole number from 1 to 64") };
                    break;
                case "max_iterations":
                    setup = setup with { MaxIterations = WholeNumber(path, e, 1, 100000, "Use a whole number from 1 to 100000 (default 300)") };
                    break;
                case "lineshape":
                    shape = Lineshape.TryParse(e.Value as string, Lineshape.EqualComponents, out var named)
                        ? named
                        : throw new FitSetupException(path, e.Line, $"unknown lineshape {e.Value}",
                            "Use one of " + string.Join(", ", Lineshape.Names.Select(n => $"\"{n}\"")));
                    break;
                default:
                    throw new FitSetupException(path, e.Line, $"unknown key \"{e.Key}\" in [fit]", $"Allowed keys: {string.Join(", ", Keys)}");
            }
        }
        var parameters = setup.BuildParameters(system, traces, 1.0);
        var names = parameters.Select(p => p.Name).ToArray();
        foreach (var e in section.Entries.Where(e => e.Table == "fit.bounds"))
        {
            var (low, high) = bounds[e.Key];
            var start = parameters.FirstOrDefault(p => p.Name == e.Key)?.Start;
            if (start is { } v && parameters.First(p => p.Name == e.Key).Kind != ParameterKind.Scale && !(v >= Math.Min(low, high) && v <= Math.Max(low, high)))
                throw new FitSetupException(path, e.Line, $"the start of {e.Key}, {v:G6}, lies outside its bounds [{Math.Min(low, high):G6}, {Math.Max(low, high):G6}]",
                    "Move the start value in the system file inside the bounds, or widen the bounds");
        }
        setup = setup with { Bounds = bounds };

        foreach (var (name, line, pattern) in nameLines)
        {
            var known = pattern ? names.Any(n => FitSetup.Matches(name, n)) : names.Contains(name);
            if (!known)
                throw new FitSetupException(path, line, $"\"{name}\" names no parameter of this system",
                    $"Parameters are: {string.Join(", ", names.Take(20))}{(names.Length > 20 ? ", ..." : "")}");
        }
        var kindOf = parameters.ToDictionary(p => p.Name, p => p.Kind, StringComparer.Ordinal);
        foreach (var tie in setup.Ties)
            if (tie.Select(n => kindOf[n]).Distinct().Count() > 1)
                throw new FitSetupException(path, tieLine, $"tie [{string.Join(", ", tie)}] mixes parameters of different kinds",
                    "Tie shifts with shifts, couplings with couplings and widths with widths");
        return new FitSettings(setup, shape);
    }

    private static IReadOnlyList<PpmRange> Ranges(string path, FitEntry e)
    {
        if (e.Value is not object[] items || items.Length == 0)
            throw new FitSetupException(path, e.Line, $"{e.Key} must be a list of [from, to] pairs", $"Write {e.Key} = [[7.6, 6.8]]");
        return items.Select(i => i is object[] pair && pair.Length == 2 && pair.All(v => v is double d && double.IsFinite(d)) && (double)pair[0] != (double)pair[1]
            ? new PpmRange((double)pair[0], (double)pair[1])
            : throw new FitSetupException(path, e.Line, $"each entry of {e.Key} must be two different numbers", $"Write {e.Key} = [[7.6, 6.8]]")).ToArray();
    }

    private static (double, double) Pair(string path, FitEntry e, string example) =>
        e.Value is object[] { Length: 2 } p && p.All(v => v is double d && double.IsFinite(d))
            ? ((double)p[0], (double)p[1])
            : throw new FitSetupException(path, e.Line, $"bounds of {e.Key} must be two numbers", $"Write {example}");

    private static IReadOnlyList<string> Strings(string path, FitEntry e) =>
        e.Value is object[] items && items.All(i => i is string)
            ? items.Cast<string>().ToArray()
            : throw new FitSetupException(path, e.Line, $"{e.Key} must be a list of parameter names", $"Write {e.Key} = [\"shift:*\", \"j:*\"]");

    private static double Number(string path, FitEntry e) =>
        e.Value is double d ? d : throw new FitSetupException(path, e.Line, $"{e.Key} must be a number", $"Write {e.Key} = 1");

    private static int WholeNumber(string path, FitEntry e, int lowest, int highest, string fix)
    {
        var value = Number(path, e);
        return value >= lowest && value <= highest && value == Math.Floor(value)
            ? (int)value
            : throw new FitSetupException(path, e.Line, $"{e.Key} is {value}", fix);
    }

    private static bool Bool(string path, FitEntry e) =>
        e.Value is bool b ? b : throw new FitSetupException(path, e.Line, $"{e.Key} must be true or false", $"Write {e.Key} = true");
}
