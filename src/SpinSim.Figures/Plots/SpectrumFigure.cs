using OxyPlot;
using OxyPlot.Annotations;
using OxyPlot.Series;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Traces;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>One transition drawn as a stick: its shift in ppm and its intensity relative to the others (any positive scale).</summary>
public sealed record StickLine(double ShiftPpm, double Intensity);

/// <summary>A label written above the spectrum at a shift, naming the nucleus or set that resonates there.</summary>
public sealed record ShiftLabel(string Text, double ShiftPpm);

/// <summary>
/// A range of the trace drawn again above itself, scaled up by <see cref="Factor"/> (chosen from 2, 5, 10, 20 ... when
/// null) so a small multiplet can be read, and labelled "×N".
/// </summary>
public sealed record VerticalExpansion(double HighPpm, double LowPpm, double? Factor = null);

/// <summary>A simulated spectrum: the trace, optionally the transitions as sticks below it, and labels at the shifts.</summary>
public static class SpectrumFigure
{
    private const string TraceAxis = "trace", StickAxis = "sticks";

    /// <summary>
    /// The figure of <paramref name="trace"/> on a reversed ppm axis spanning the trace. With
    /// <paramref name="sticks"/>, a panel below shows one stick per transition scaled to the tallest; with
    /// <paramref name="labels"/>, each text is written above the trace at its shift, raised a row where
    /// neighbours would overlap. Intensities are in arbitrary units, so no intensity axis is drawn.
    /// </summary>
    /// <exception cref="ArgumentException">A stick or label with a non-finite value, or invalid options.</exception>
    /// <param name="expansions">Ranges drawn again, scaled up, above the trace (insets "×N"); none when null.</param>
    public static PlotModel Simulated(SpectrumTrace trace, IReadOnlyList<StickLine>? sticks, IReadOnlyList<ShiftLabel>? labels,
        FigureOptions options, IReadOnlyList<VerticalExpansion>? expansions = null)
    {
        ArgumentNullException.ThrowIfNull(trace);
        ArgumentNullException.ThrowIfNull(options);
        sticks ??= [];
        labels ??= [];
        foreach (var s in sticks)
            if (!double.IsFinite(s.ShiftPpm) || !double.IsFinite(s.Intensity))
                throw new ArgumentException($"stick at {s.ShiftPpm} ppm with intensity {s.Intensity}: both must be finite", nameof(sticks));
        foreach (var l in labels)
            if (l.Text is null || !double.IsFinite(l.ShiftPpm))
                throw new ArgumentException($"label '{l.Text}' at {l.ShiftPpm} ppm: text and a finite shift are required", nameof(labels));

        var size = options.Resolve();
        var font = FigureStyle.FontUnits(options);
        var field = trace.ObserveMHz is { } mhz ? FormattableString.Invariant($" at {mhz:0.#} MHz") : "";
        var model = FigureStyle.NewModel(options, $"Simulated {FigureStyle.NucleusLabel(trace.Nucleus)} spectrum{field}");

        var (minPpm, maxPpm) = FigureStyle.Range(trace.ShiftPpm);
        var ppmAxis = FigureStyle.PpmAxis(trace.Nucleus, minPpm, maxPpm);
        model.Axes.Add(ppmAxis);
        FigureStyle.SetTicks([(ppmAxis, size.WidthUnits * 0.9)], font);

        // Sticks get the lower quarter of the plot height, the trace the rest.
        var hasSticks = sticks.Count > 0;
        var traceStart = hasSticks ? 0.3 : 0.0;

        var (yMin, yMax) = FigureStyle.Range(trace.Intensity);
        yMin = Math.Min(0, yMin);
        if (yMax <= yMin) yMax = yMin + 1;

        // Labels: rows chosen by horizontal overlap, estimated from the figure width; heights from the trace.
        var plotWidthUnits = size.WidthUnits * 0.85;
        var ppmPerUnit = (maxPpm - minPpm) / plotWidthUnits;
        var placed = PlaceLabels(trace, labels, font, ppmPerUnit);
        var lineHeight = BundledFont.LineHeight(font);
        var rows = placed.Count == 0 ? 0 : placed.Max(p => p.Row) + 1;
        var traceHeightUnits = size.HeightUnits * 0.7 * (1 - traceStart);
        var headroom = Math.Min(0.6, (rows * lineHeight + font * 0.5) / traceHeightUnits);
        var top = yMax + (yMax - yMin) * (0.05 + headroom / (1 - headroom));
        model.Axes.Add(FigureStyle.HiddenVerticalAxis(TraceAxis, yMin - 0.02 * (yMax - yMin), top, traceStart, 1));

        model.Series.Add(FigureStyle.Line(FigureStyle.Points(trace.ShiftPpm, trace.Intensity), FigurePalette.Simulated,
            LineStyle.Solid, FigureStyle.TraceThickness, TraceAxis, "simulated spectrum"));

        if (hasSticks)
        {
            var tallest = sticks.Max(s => Math.Abs(s.Intensity));
            if (tallest == 0) tallest = 1;
            model.Axes.Add(FigureStyle.HiddenVerticalAxis(StickAxis, -0.02, 1.05, 0, 0.25));
            var stems = new StemSeries
            {
                Color = FigurePalette.Sticks,
                StrokeThickness = FigureStyle.TraceThickness * 0.75,
                Base = 0,
                Title = "transitions",
                XAxisKey = "ppm",
                YAxisKey = StickAxis,
            };
            stems.Points.AddRange(sticks.OrderBy(s => s.ShiftPpm).Select(s => new DataPoint(s.ShiftPpm, s.Intensity / tallest)));
            model.Series.Add(stems);
        }

        foreach (var p in placed)
            model.Annotations.Add(new TextAnnotation
            {
                Text = p.Text,
                TextPosition = new DataPoint(p.LabelPpm, p.PeakTop),
                Offset = new ScreenVector(0, -(font * 0.4 + p.Row * lineHeight)),
                TextHorizontalAlignment = HorizontalAlignment.Center,
                TextVerticalAlignment = VerticalAlignment.Bottom,
                StrokeThickness = 0,
                Background = OxyColors.Undefined,
                TextColor = FigurePalette.Ink,
                FontSize = font,
                XAxisKey = "ppm",
                YAxisKey = TraceAxis,
                // Raised labels may stand above the axis maximum; clipping them would hide the name of a peak.
                ClipByYAxis = false,
            });

        // One trace needs no legend; with sticks the legend says which is which.
        foreach (var expansion in expansions ?? []) AddExpansion(model, trace, expansion, yMax, font);

        if (hasSticks) FigureLegend.AddAbove(model, font);
        return model;
    }

    /// <summary>Draws <see cref="Simulated"/> into <paramref name="output"/>.</summary>
    public static void Render(SpectrumTrace trace, IReadOnlyList<StickLine>? sticks, IReadOnlyList<ShiftLabel>? labels,
        FigureOptions options, FigureFormat format, Stream output) =>
        FigureRenderer.Render(Simulated(trace, sticks, labels, options), format, options, output);

    // The range again, scaled by N and lifted to 35 % of the tallest point so it floats over the baseline of the trace;
    // N by default brings the range's tallest point to about 55 % of the trace's (1-2-5 steps, rounded down).
    private static void AddExpansion(PlotModel model, SpectrumTrace trace, VerticalExpansion expansion, double yMax, double font)
    {
        var high = Math.Max(expansion.HighPpm, expansion.LowPpm);
        var low = Math.Min(expansion.HighPpm, expansion.LowPpm);
        var inside = Enumerable.Range(0, trace.Count).Where(i => trace.ShiftPpm[i] >= low && trace.ShiftPpm[i] <= high).ToArray();
        if (inside.Length < 2)
            throw new ArgumentException($"the expansion {high}..{low} ppm holds fewer than 2 points of the trace; give a range inside it", nameof(expansion));
        var local = inside.Max(i => trace.Intensity[i]);
        var factor = expansion.Factor ?? (local > 0 ? FigureStyle.NiceStepBelow(0.55 * yMax / local) : 1);
        if (!(factor >= 1 && double.IsFinite(factor))) throw new ArgumentException($"an expansion factor must be at least 1, got {factor}", nameof(expansion));
        var lift = 0.35 * yMax;
        var points = inside.Select(i => (Ppm: trace.ShiftPpm[i], Y: lift + trace.Intensity[i] * factor)).ToArray();
        model.Series.Add(FigureStyle.Line(FigureStyle.Points(points.Select(p => p.Ppm).ToArray(), points.Select(p => p.Y).ToArray()),
            FigurePalette.Simulated, LineStyle.Solid, FigureStyle.TraceThickness * 0.8, TraceAxis, ""));
        model.Series[^1].RenderInLegend = false;
        model.Annotations.Add(new TextAnnotation
        {
            Text = string.Create(System.Globalization.CultureInfo.InvariantCulture, $"×{factor:0.##}"),
            TextPosition = new DataPoint(high, lift + local * factor),
            TextHorizontalAlignment = HorizontalAlignment.Left,
            TextVerticalAlignment = VerticalAlignment.Bottom,
            StrokeThickness = 0,
            Background = OxyColors.Undefined,
            TextColor = FigurePalette.Ink,
            FontSize = font * 0.9,
            XAxisKey = "ppm",
            YAxisKey = TraceAxis,
        });
    }

    /// <summary>Sticks for the lines of an engine result.</summary>
    public static IReadOnlyList<StickLine> SticksFrom(LineList lines) =>
        lines.Lines.Select(l => new StickLine(l.ShiftPpm, l.Intensity)).ToArray();

    /// <summary>
    /// One label per resonance of the observed isotope: entries at the same shift (the mirrored HA and HA′ of AA′BB′, or
    /// other chemically equivalent entries) share one label, "HA/HA′", written with primes.
    /// </summary>
    public static IReadOnlyList<ShiftLabel> LabelsFrom(SpinSystem system) =>
        system.Nuclei.Where(n => n.Isotope == system.Observed).GroupBy(n => n.Shift.Value)
            .Select(g => new ShiftLabel(string.Join("/", g.Select(n => Core.Reporting.Typography.Primes(n.Id))), g.Key)).ToArray();

    // LabelPpm: where the text is centred, moved in from the edges so the whole label stays inside the plot.
    private sealed record PlacedLabel(string Text, double ShiftPpm, double LabelPpm, double PeakTop, int Row);

    // Greedy rows from left to right on the page (high ppm first): a label takes the lowest row whose last
    // label ends before it starts. The estimate of the text width in ppm only has to be roughly right.
    private static List<PlacedLabel> PlaceLabels(SpectrumTrace trace, IReadOnlyList<ShiftLabel> labels, double font, double ppmPerUnit)
    {
        var placed = new List<PlacedLabel>();
        var rowEnds = new List<double>(); // lowest ppm reached by the last label of each row
        var (minPpm, maxPpm) = FigureStyle.Range(trace.ShiftPpm);
        foreach (var label in labels.Where(l => l.ShiftPpm >= minPpm && l.ShiftPpm <= maxPpm).OrderByDescending(l => l.ShiftPpm))
        {
            var halfWidth = (BundledFont.MeasureWidth(label.Text, font) / 2 + font * 0.3) * ppmPerUnit;
            var row = rowEnds.FindIndex(end => end > label.ShiftPpm + halfWidth);
            if (row < 0) { row = rowEnds.Count; rowEnds.Add(0); }
            rowEnds[row] = label.ShiftPpm - halfWidth;
            var inside = Math.Clamp(label.ShiftPpm, minPpm + halfWidth, Math.Max(minPpm + halfWidth, maxPpm - halfWidth));
            placed.Add(new PlacedLabel(label.Text, label.ShiftPpm, inside, LocalMaximum(trace, label.ShiftPpm, Math.Max(halfWidth, 2 * ppmPerUnit)), row));
        }
        return placed;
    }

    private static double LocalMaximum(SpectrumTrace trace, double ppm, double halfWindow)
    {
        var best = double.NegativeInfinity;
        for (var i = 0; i < trace.Count; i++)
            if (Math.Abs(trace.ShiftPpm[i] - ppm) <= halfWindow && trace.Intensity[i] > best) best = trace.Intensity[i];
        if (double.IsNegativeInfinity(best)) // window between two points: take the nearest
        {
            var nearest = Enumerable.Range(0, trace.Count).MinBy(i => Math.Abs(trace.ShiftPpm[i] - ppm));
            best = trace.Intensity[nearest];
        }
        return Math.Max(best, 0);
    }
}
