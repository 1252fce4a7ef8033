using SpinSim.Core.Engine;
using SpinSim.Core.Errors;
using SpinSim.Core.Model;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;

namespace SpinSim.Core.Spectrum;

/// <summary>How a line list becomes a trace.</summary>
/// <param name="DefaultWidth">FWHM of lines whose nuclei state no width of their own.</param>
/// <param name="FromPpm">Left (high-ppm) end of the window; null for all lines plus a margin.</param>
/// <param name="ToPpm">Right (low-ppm) end of the window; null for all lines plus a margin.</param>
/// <param name="Points">Number of points of the trace.</param>
/// <param name="ReferenceOffsetPpm">Added to every shift on the axis (a referencing error to imitate).</param>
public sealed record SimulationSettings(
    WidthHz DefaultWidth,
    Lineshape Shape,
    double? FromPpm = null,
    double? ToPpm = null,
    int Points = 65536,
    double ReferenceOffsetPpm = 0);

/// <summary>The integral of one nucleus entry, normalised so that all observed entries add up to their proton count.</summary>
public sealed record Integral(string Id, double ShiftPpm, int Count, double Value);

/// <summary>A simulated trace (every line whole, tails included) with the integrals of its nuclei.</summary>
public sealed record SimulatedSpectrum(SpectrumTrace Trace, IReadOnlyList<Integral> Integrals, SpectrumGrid Grid);

public static class SpectrumSimulator
{
    /// <summary>Lines whose peak height is below this fraction of the tallest one do not widen the default window.</summary>
    public const double VisibleFraction = 1e-4;

    /// <summary>
    /// The lines as areas with widths: every line's area is its intensity over 2^(N-1), so the trace integrates (over Hz)
    /// to the number of observed nuclei; its width is the origin-weighted width of the entries that flip.
    /// </summary>
    public static RenderLine[] RenderLines(SpinSystem system, LineList lines, WidthHz defaultWidth)
    {
        var widths = system.Nuclei.Select(n => (n.Width ?? defaultWidth).Value).ToArray();
        var uniform = widths.All(w => w == widths[0]);
        var scale = 1.0 / Math.Pow(2, system.Nuclei.Sum(n => n.Count) - 1);
        var result = new RenderLine[lines.Lines.Count];
        for (var i = 0; i < result.Length; i++)
        {
            var l = lines.Lines[i];
            result[i] = new RenderLine(l.FrequencyHz, l.Intensity * scale, uniform ? widths[0] : lines.WeightedByOrigin(i, widths));
        }
        return result;
    }

    public static SimulatedSpectrum Simulate(SpinSystem system, LineList lines, SimulationSettings settings)
    {
        var render = RenderLines(system, lines, settings.DefaultWidth);
        var observeMHz = lines.ObserveMHz;
        // The default window covers the lines one could see: weak combination lines far out would only stretch it.
        if (render.Length == 0 && (settings.FromPpm is null || settings.ToPpm is null))
            throw new InputException(null, null, $"the system has no {system.Observed} lines, so there is no window to draw a trace over",
                $"Add {system.Observed} nuclei, or give the window (from and to in ppm)");
        var tallest = render.Length == 0 ? 0 : render.Max(l => l.Area / l.FwhmHz);
        var visible = render.Where(l => l.Area / l.FwhmHz >= VisibleFraction * tallest).ToArray();
        var window = SpectrumGrid.WindowFor(visible, observeMHz, settings.ReferenceOffsetPpm);
        var grid = new SpectrumGrid(settings.FromPpm ?? window.FromPpm, settings.ToPpm ?? window.ToPpm, settings.Points, observeMHz, settings.ReferenceOffsetPpm);
        var intensity = TraceSynthesizer.Render(render, grid, settings.Shape);
        var axis = Enumerable.Range(0, grid.Points).Select(grid.PpmAt).ToArray();
        var trace = new SpectrumTrace(axis, intensity, observeMHz, system.Observed.Symbol,
            TraceOrigin.Describe(string.IsNullOrEmpty(system.Title) ? "simulated spectrum" : system.Title, "simulated", settings.Shape.ToString()));
        return new SimulatedSpectrum(trace, Integrals(system, lines), grid);
    }

    /// <summary>
    /// Sum over lines of intensity x origin weight for each observed entry, normalised to the number of observed nuclei.
    /// Summed over every line this is Tr(F+ I-_e) = count_e 2^(N-1), so each entry integrates to its count exactly
    /// whatever the couplings, up to the intensity dropped below the engine's floor.
    /// </summary>
    public static IReadOnlyList<Integral> Integrals(SpinSystem system, LineList lines)
    {
        var sums = new double[system.Nuclei.Count];
        for (var i = 0; i < lines.Lines.Count; i++)
        {
            var origin = lines.OriginOf(i);
            for (var e = 0; e < sums.Length; e++) sums[e] += lines.Lines[i].Intensity * origin[e];
        }
        var scale = system.ObservedNucleusCount / Math.Max(sums.Sum(), double.Epsilon);
        return Enumerable.Range(0, system.Nuclei.Count)
            .Where(e => system.Nuclei[e].Isotope == system.Observed)
            .Select(e => new Integral(system.Nuclei[e].Id, system.Nuclei[e].Shift.Value, system.Nuclei[e].Count, sums[e] * scale))
            .ToList();
    }
}
