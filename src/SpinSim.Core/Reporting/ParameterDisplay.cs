using SpinSim.Core.Fitting.Spectral;

namespace SpinSim.Core.Reporting;

/// <summary>
/// The one place that says how a fitted parameter is shown to a reader: its label with the unit as a quantity over
/// its unit ("δ(HA)/ppm", "J(HA,HB)/Hz", "width/Hz"), its group, and how many decimals it gets when there is no
/// uncertainty to round to. Text, HTML and figure tables all read from here; the per-kind parts come from the kind's
/// <see cref="ParameterKindInfo"/>.
/// </summary>
public static class ParameterDisplay
{
    /// <summary>The group a kind of parameter is listed in.</summary>
    public static ParameterGroup GroupOf(ParameterKind kind) => ParameterKindInfo.Of(kind).Group;

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
        var label = ParameterKindInfo.Of(p.Kind).Label(nuclei, p.Name) ?? BareName(p.Name);
        return p.Dataset >= 0 && (traces > 1 || p.Dataset > 0) ? $"{label} [trace {p.Dataset + 1}]" : label;
    }

    /// <summary>Decimals of a value with no usable uncertainty (fixed, or undetermined by the data).</summary>
    public static int FallbackDecimals(ParameterKind kind) => ParameterKindInfo.Of(kind).FallbackDecimals;

    /// <summary>The value rounded to its uncertainty, "2.762000(8)", with the true minus sign when asked.</summary>
    public static string ValueText(FittedParameter p, bool trueMinus = false) =>
        new UncertainValue(p.Value, p.Varied ? p.StdError : double.NaN).Concise(FallbackDecimals(p.Kind), trueMinus);

    private static string BareName(string name) => name.Split('@')[0];
}
