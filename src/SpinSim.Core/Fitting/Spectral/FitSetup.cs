using SpinSim.Core.Errors;
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

    /// <summary>
    /// Couplings (names or patterns) whose sign is held as given: they stay free in size but keep their starting sign
    /// (a one-sided bound at zero), and the relative-sign search does not reverse them.
    /// </summary>
    public IReadOnlyList<string> HoldSign { get; init; } = [];
    public IReadOnlyList<IReadOnlyList<string>> Ties { get; init; } = [];
    public IReadOnlyDictionary<string, (double Low, double High)> Bounds { get; init; } = new Dictionary<string, (double, double)>();
    public int BaselineOrder { get; init; }
    public bool FitOffset { get; init; }
    public bool FitPhase { get; init; }

    /// <summary>
    /// Fit a first-order phase per trace (<c>phase_deg_per_ppm</c>, degrees per ppm about the centre of the trace's fitted
    /// regions) beside the zero-order one, which it switches on too: a ramp needs its level. Off by default, so the phase
    /// slope is 0 unless asked for: a processed spectrum is normally phased, and a slope that fits noise would cost the
    /// shifts precision.
    /// </summary>
    public bool FitFirstOrderPhase { get; init; }
    public bool PerNucleusWidth { get; init; }
    public int Starts { get; init; } = 8;

    /// <summary>Most iterations of the minimiser in each stage of each start (null: the fitter's default).</summary>
    public int? MaxIterations { get; init; }

    /// <summary>
    /// Each shift without a bound of its own stays within this many ppm of its start: far enough for a misreferenced
    /// spectrum or a rough start, near enough that a nucleus cannot wander into another group's multiplet.
    /// </summary>
    public double ShiftWindowPpm { get; init; } = DefaultShiftWindowPpm;

    public const double DefaultShiftWindowPpm = 0.3;

    /// <summary>
    /// Hold the shift of a nucleus none of whose lines falls in a fitted region (its couplings to observed nuclei stay
    /// free): with no data of its own it would move wherever it helps another multiplet, as a phantom line.
    /// </summary>
    public bool HoldShiftsOutsideRegions { get; init; } = true;

    /// <summary>Symmetries declared in the spin-system file; their shifts and couplings are tied unless <see cref="TieSymmetric"/> is false.</summary>
    public IReadOnlyList<MirrorSymmetry> Symmetries { get; init; } = [];

    public bool TieSymmetric { get; init; } = true;

    /// <summary>In a joint fit, one common linewidth per trace (default) rather than one for all traces.</summary>
    public bool WidthPerTrace { get; init; } = true;

    /// <summary>Margin added around the lines for the default regions: 10 widths plus this many Hz (room for shifts to move).</summary>
    public const double RegionMarginHz = 25;

    /// <summary>
    /// The fit problem for <paramref name="system"/> (its values are the start) and <paramref name="traces"/>: regions as
    /// given or worked out per trace, the parameters with their bounds, the user's ties plus those of the declared
    /// symmetries, shifts held for nuclei outside every region, and a notice for each such decision.
    /// </summary>
    /// <exception cref="InputException">A start outside its bounds.</exception>
    public SpectrumFitProblem Problem(SpinSystem system, IReadOnlyList<Traces.SpectrumTrace> traces, double startWidthHz, Lineshape shape)
    {
        var data = traces.Select(t => new FitDataset(t, Regions ?? DefaultRegions(system, t.ObserveMHz!.Value, startWidthHz), Exclude)
            { RegionsAutomatic = Regions is null }).ToArray();
        var parameters = BuildParameters(system, traces.Count, startWidthHz).ToList();
        var notes = new List<string>();
        if (HoldShiftsOutsideRegions)
            foreach (var id in NucleiOutsideRegions(system, data))
            {
                var i = parameters.FindIndex(p => p.Name == $"shift:{id}");
                if (i < 0 || !parameters[i].Vary) continue;
                parameters[i] = parameters[i] with { Vary = false, HeldBecause = "outside every fitted region" };
                notes.Add($"no line of {id} falls in a fitted region, so its shift is held at {parameters[i].Start:0.####} ppm " +
                          "(its couplings stay free); add it to the regions, or set hold_shifts_outside_regions = false to vary it anyway");
            }
        // A frequency offset of the first trace moves every line as moving every shift together does, so with shifts
        // free it is held at 0: that trace is the reference, and the offsets of further traces are fitted relative to it
        // (at another field a common shift in ppm and an offset in Hz move the lines differently, so those are determined).
        var firstOffset = parameters.FindIndex(p => p.Kind == ParameterKind.OffsetHz && p.Dataset == 0);
        if (firstOffset >= 0 && parameters[firstOffset].Vary && parameters.Any(p => p.Kind == ParameterKind.ShiftPpm && p.Vary))
        {
            parameters[firstOffset] = parameters[firstOffset] with { Vary = false, HeldBecause = "the first trace is the shift reference" };
            notes.Add("offset_hz of the first trace is held at 0 Hz: shifting every line by an offset looks exactly like moving every shift " +
                      "together, so the spectrum cannot tell them apart; the shifts take up any referencing error of that trace" +
                      (traces.Count > 1 ? ", and the offsets of the other traces are fitted relative to it" : "") +
                      " (fix the shifts, e.g. fix = [\"shift:*\"], to fit the offset instead)");
        }
        var ties = Ties.ToList();
        if (TieSymmetric)
            foreach (var symmetry in Symmetries) ties.AddRange(SymmetryTies(symmetry, parameters));
        return new SpectrumFitProblem(system, data, parameters, ties, shape) { Notes = notes, Symmetries = Symmetries, ShiftWindowPpm = ShiftWindowPpm, SymmetriesTied = TieSymmetric };
    }

    /// <summary>Tie groups that make a fit respect <paramref name="symmetry"/>: each shift, width and coupling with its image.</summary>
    public static IEnumerable<IReadOnlyList<string>> SymmetryTies(MirrorSymmetry symmetry, IReadOnlyList<FitParameter> parameters)
    {
        var names = parameters.Select(p => p.Name).ToHashSet(StringComparer.Ordinal);
        var done = new HashSet<string>(StringComparer.Ordinal);
        foreach (var p in parameters.Where(p => p.Kind is ParameterKind.ShiftPpm or ParameterKind.JHz or ParameterKind.LinewidthHz && p.Nuclei.Count > 0))
        {
            var image = p.Kind switch
            {
                ParameterKind.JHz => ImageCoupling(symmetry, p.Nuclei[0], p.Nuclei[1], names),
                _ => p.Name[..(p.Name.IndexOf(':') + 1)] + symmetry.Image(p.Nuclei[0]),
            };
            if (image is null || image == p.Name || !names.Contains(image) || !done.Add(p.Name) || !done.Add(image)) continue;
            yield return [p.Name, image];
        }
    }

    private static string? ImageCoupling(MirrorSymmetry symmetry, string a, string b, HashSet<string> names)
    {
        var (ia, ib) = (symmetry.Image(a), symmetry.Image(b));
        return names.Contains($"j:{ia}-{ib}") ? $"j:{ia}-{ib}" : names.Contains($"j:{ib}-{ia}") ? $"j:{ib}-{ia}" : null;
    }

    /// <summary>
    /// Observed nuclei that carry (almost) none of the line intensity inside the fitted regions of any trace: at each
    /// trace's field, each line is shared out among the nuclei that flip in it, and a nucleus with less than
    /// <see cref="OutsideShare"/> of its share inside the regions counts as outside them.
    /// </summary>
    public static IReadOnlyList<string> NucleiOutsideRegions(SpinSystem system, IReadOnlyList<FitDataset> data)
    {
        var inside = new double[system.Nuclei.Count];
        var total = new double[system.Nuclei.Count];
        foreach (var d in data)
        {
            var atField = system.WithField(new Units.FieldMHz(d.ObserveMHz * 100 / system.Observed.FrequencyRatioPercent));
            var lines = SpectrumEngine.Compute(atField);
            for (var l = 0; l < lines.Lines.Count; l++)
            {
                var ppm = lines.Lines[l].ShiftPpm;
                var seen = d.Regions.Any(r => r.Contains(ppm)) && !d.Exclude.Any(r => r.Contains(ppm));
                var origin = lines.OriginOf(l);
                for (var e = 0; e < origin.Length; e++)
                {
                    var share = lines.Lines[l].Intensity * Math.Max(0, origin[e]);
                    total[e] += share;
                    if (seen) inside[e] += share;
                }
            }
        }
        return Enumerable.Range(0, system.Nuclei.Count)
            .Where(e => system.Nuclei[e].Isotope == system.Observed && total[e] > 0 && inside[e] < OutsideShare * total[e])
            .Select(e => system.Nuclei[e].Id).ToArray();
    }

    /// <summary>A nucleus with less than this share of its line intensity inside the regions is outside them.</summary>
    public const double OutsideShare = 0.01;

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
        else if (traces == 1 || !WidthPerTrace)
            list.Add(Make("linewidth", ParameterKind.LinewidthHz, [], -1, -1, startWidthHz, 0.01, 100));
        else
            // Traces at different fields, or from different instruments, rarely share a width: one each by default.
            for (var d = 0; d < traces; d++)
                list.Add(Make("linewidth" + (d == 0 ? "" : $"@{d + 1}"), ParameterKind.LinewidthHz, [], d, -1, startWidthHz, 0.01, 100));
        for (var d = 0; d < traces; d++)
        {
            var at = d == 0 ? "" : $"@{d + 1}";
            list.Add(Make("scale" + at, ParameterKind.Scale, [], d, 0, 1, 0, double.PositiveInfinity));
            for (var k = 0; k <= BaselineOrder; k++)
                list.Add(Make($"baseline{k}{at}", ParameterKind.Baseline, [], d, k, 0, double.NegativeInfinity, double.PositiveInfinity));
            foreach (var kind in TraceTerms())
            {
                var info = ParameterKindInfo.Of(kind);
                var (start, lower, upper) = info.OptionalTraceTerm!.Value;
                list.Add(Make(info.Key + at, kind, [], d, 0, start, lower, upper));
            }
        }
        return list;
    }

    /// <summary>The optional per-trace terms this setup asks for, each named by its kind's key.</summary>
    private IEnumerable<ParameterKind> TraceTerms()
    {
        if (FitOffset) yield return ParameterKind.OffsetHz;
        if (FitPhase || FitFirstOrderPhase) yield return ParameterKind.PhaseDeg;
        if (FitFirstOrderPhase) yield return ParameterKind.PhaseDegPerPpm;
    }

    private FitParameter Make(string name, ParameterKind kind, IReadOnlyList<string> nuclei, int dataset, int index, double start, double lower, double upper)
    {
        var vary = Vary.Any(p => Matches(p, name)) || ParameterKindInfo.Of(kind).OptionalTraceTerm is not null;
        if (Fix.Any(p => Matches(p, name))) vary = false;
        var given = Bounds.TryGetValue(name, out var b);
        if (given) (lower, upper) = (Math.Min(b.Low, b.High), Math.Max(b.Low, b.High));
        else if (kind == ParameterKind.ShiftPpm) (lower, upper) = (start - ShiftWindowPpm, start + ShiftWindowPpm);
        if (kind == ParameterKind.JHz && HoldSign.Any(p => Matches(p, name)))
            (lower, upper) = start >= 0 ? (Math.Max(lower, 0), upper) : (lower, Math.Min(upper, 0));
        if (kind != ParameterKind.Scale && !(start >= lower && start <= upper))
            throw new InputException(null, null, $"the start of {name}, {start:G6}, lies outside its bounds [{lower:G6}, {upper:G6}]",
                "Change the start value in the system file, or widen the bounds in [fit.bounds] (shift_window_ppm for the default shift window)");
        return new FitParameter(name, kind, nuclei, dataset, index, start, lower, upper, vary) { BoundsGiven = given };
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
