using SpinSim.Core.Fitting.Spectral;

namespace SpinSim.Core.Reporting;

/// <summary>How a reader groups fitted parameters: the chemistry first, then line widths, then the nuisance terms.</summary>
public enum ParameterGroup { Spin, Width, Nuisance }

/// <summary>
/// The one place that says how a fitted parameter is shown to a reader: its label with the unit as a quantity over
/// its unit ("δ(HA)/ppm", "J(HA,HB)/Hz", "width/Hz"), its group, and how many decimals it gets when there is no
/// uncertainty to round to. Text, HTML and figure tables all read from here; a new parameter kind needs a line in
/// each switch and falls into the nuisance group, labelled by its name, until it has one.
/// </summary>
public static class ParameterDisplay
{
    /// <summary>The group a kind of parameter is listed in.</summary>
    public static ParameterGroup GroupOf(ParameterKind kind) => kind switch
    {
        ParameterKind.ShiftPpm or ParameterKind.JHz => ParameterGroup.Spin,
        ParameterKind.LinewidthHz => ParameterGroup.Width,
        _ => ParameterGroup.Nuisance,
    };

    /// <summary>Heading of a group in tables.</summary>
    public static string GroupHeading(ParameterGroup group) => group switch
    {
        ParameterGroup.Spin => "shifts and couplings",
        ParameterGroup.Width => "line widths",
        _ => "nuisance parameters",
    };

    /// <summary>
    /// "δ(HA)/ppm", "J(HA,HB)/Hz", "width/Hz", "width(HA)/Hz", "scale", "baseline, constant", "offset/Hz", "phase/°";
    /// per-trace parameters of a joint fit (<paramref name="traces"/> above 1) end in " [trace 2]".
    /// </summary>
    public static string Label(FittedParameter p, int traces = 1)
    {
        ArgumentNullException.ThrowIfNull(p);
        var nuclei = (p.Nuclei ?? []).Select(Typography.Primes).ToArray();
        var label = p.Kind switch
        {
            ParameterKind.ShiftPpm when nuclei.Length == 1 => $"δ({nuclei[0]})/ppm",
            ParameterKind.JHz when nuclei.Length == 2 => $"J({nuclei[0]},{nuclei[1]})/Hz",
            ParameterKind.LinewidthHz => nuclei.Length == 1 ? $"width({nuclei[0]})/Hz" : "width/Hz",
            ParameterKind.Scale => "scale",
            ParameterKind.Baseline => $"baseline, {BaselineTerm(p.Name)}",
            ParameterKind.OffsetHz => "offset/Hz",
            ParameterKind.PhaseDeg => "phase/°",
            _ => BareName(p.Name),
        };
        return p.Dataset >= 0 && (traces > 1 || p.Dataset > 0) ? $"{label} [trace {p.Dataset + 1}]" : label;
    }

    /// <summary>Decimals of a value with no usable uncertainty (fixed, or undetermined by the data).</summary>
    public static int FallbackDecimals(ParameterKind kind) => kind switch
    {
        ParameterKind.ShiftPpm => 4,
        ParameterKind.JHz or ParameterKind.LinewidthHz or ParameterKind.OffsetHz => 3,
        ParameterKind.PhaseDeg => 2,
        _ => 4,
    };

    /// <summary>The value rounded to its uncertainty, "2.762000(8)", with the true minus sign when asked.</summary>
    public static string ValueText(FittedParameter p, bool trueMinus = false) =>
        new UncertainValue(p.Value, p.Varied ? p.StdError : double.NaN).Concise(FallbackDecimals(p.Kind), trueMinus);

    private static string BareName(string name) => name.Split('@')[0];

    private static string BaselineTerm(string name)
    {
        var bare = BareName(name);
        return bare.Length > 0 && char.IsAsciiDigit(bare[^1])
            ? (bare[^1] - '0') switch { 0 => "constant", 1 => "linear", 2 => "quadratic", 3 => "cubic", var k => $"order {k}" }
            : bare;
    }
}
