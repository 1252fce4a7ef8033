using System.Text.RegularExpressions;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// A user's fit setup: which parameters vary (name patterns with '*'), which are fixed or tied, bounds, regions and the
/// optional baseline order, frequency offset and phase. The defaults vary every shift and coupling, one common linewidth,
/// the intensity scale and a constant baseline, over the ppm range the system's lines cover plus a margin.
/// </summary>
public sealed record FitSetup
{
    public IReadOnlyList<PpmRange>? Regions { get; init; }
    public IReadOnlyList<PpmRange> Exclude { get; init; } = [];
    public IReadOnlyList<string> Vary { get; init; } = ["shift:*", "j:*", "linewidth*", "scale*", "baseline*"];
    public IReadOnlyList<string> Fix { get; init; } = [];
    public IReadOnlyList<IReadOnlyList<string>> Ties { get; init; } = [];
    public IReadOnlyDictionary<string, (double Low, double High)> Bounds { get; init; } = new Dictionary<string, (double, double)>();
    public int BaselineOrder { get; init; }
    public bool FitOffset { get; init; }
    public bool FitPhase { get; init; }
    public bool PerNucleusWidth { get; init; }
    public int Starts { get; init; } = 8;

    /// <summary>Margin added around the lines for the default regions: 10 widths plus this many Hz (room for shifts to move).</summary>
    public const double RegionMarginHz = 25;

    public static bool Matches(string pattern, string name) =>
        Regex.IsMatch(name, "^" + Regex.Escape(pattern).Replace("\\*", ".*") + "$", RegexOptions.CultureInvariant);

    /// <summary>The full parameter list for <paramref name="system"/> fitted to <paramref name="traces"/> traces.</summary>
    public IReadOnlyList<FitParameter> BuildParameters(SpinSystem system, int traces, double startWidthHz)
    {
        var list = new List<FitParameter>();
        var observed = Enumerable.Range(0, system.Nuclei.Count).Where(e => system.Nuclei[e].Isotope == system.Observed).ToArray();
        foreach (var e in observed)
            list.Add(Make($"shift:{system.Nuclei[e].Id}", ParameterKind.ShiftPpm, [system.Nuclei[e].Id], -1, e, system.Nuclei[e].Shift.Value,
                double.NegativeInfinity, double.PositiveInfinity));
        for (var c = 0; c < system.Couplings.Count; c++)
        {
            var k = system.Couplings[c];
            list.Add(Make($"j:{k.A}-{k.B}", ParameterKind.JHz, [k.A, k.B], -1, c, k.J.Value, -100, 100));
        }
        if (PerNucleusWidth)
            foreach (var e in observed)
                list.Add(Make($"linewidth:{system.Nuclei[e].Id}", ParameterKind.LinewidthHz, [system.Nuclei[e].Id], -1, e,
                    system.Nuclei[e].Width?.Value ?? startWidthHz, 0.01, 100));
        else
            list.Add(Make("linewidth", ParameterKind.LinewidthHz, [], -1, -1, startWidthHz, 0.01, 100));
        for (var d = 0; d < traces; d++)
        {
            var at = d == 0 ? "" : $"@{d + 1}";
            list.Add(Make("scale" + at, ParameterKind.Scale, [], d, 0, 1, 0, double.PositiveInfinity));
            for (var k = 0; k <= BaselineOrder; k++)
                list.Add(Make($"baseline{k}{at}", ParameterKind.Baseline, [], d, k, 0, double.NegativeInfinity, double.PositiveInfinity));
            if (FitOffset) list.Add(Make("offset_hz" + at, ParameterKind.OffsetHz, [], d, 0, 0, -10, 10));
            if (FitPhase) list.Add(Make("phase_deg" + at, ParameterKind.PhaseDeg, [], d, 0, 0, -45, 45));
        }
        return list;
    }

    private FitParameter Make(string name, ParameterKind kind, IReadOnlyList<string> nuclei, int dataset, int index, double start, double lower, double upper)
    {
        var vary = Vary.Any(p => Matches(p, name)) || kind is ParameterKind.OffsetHz or ParameterKind.PhaseDeg;
        if (Fix.Any(p => Matches(p, name))) vary = false;
        if (Bounds.TryGetValue(name, out var b)) (lower, upper) = (Math.Min(b.Low, b.High), Math.Max(b.Low, b.High));
        return new FitParameter(name, kind, nuclei, dataset, index, start, lower, upper, vary);
    }

    /// <summary>The default regions: the visible lines at the trace's field, each widened by the margin, merged.</summary>
    public static IReadOnlyList<PpmRange> DefaultRegions(SpinSystem system, double observeMHz, double widthHz)
    {
        var atField = system.WithField(new Units.FieldMHz(observeMHz * 100 / system.Observed.FrequencyRatioPercent));
        var lines = SpectrumEngine.Compute(atField).Lines;
        if (lines.Count == 0) return [];
        var tallest = lines.Max(l => l.Intensity);
        var marginPpm = (10 * widthHz + RegionMarginHz) / observeMHz;
        var intervals = lines.Where(l => l.Intensity >= SpectrumSimulator.VisibleFraction * tallest)
            .Select(l => (Low: l.ShiftPpm - marginPpm, High: l.ShiftPpm + marginPpm)).OrderBy(i => i.Low).ToList();
        var merged = new List<PpmRange>();
        var (low, high) = intervals[0];
        foreach (var (l, h) in intervals.Skip(1))
        {
            if (l <= high) { high = Math.Max(high, h); continue; }
            merged.Add(new PpmRange(high, low));
            (low, high) = (l, h);
        }
        merged.Add(new PpmRange(high, low));
        return merged;
    }
}
