using OxyPlot;
using SpinSim.Core.Traces;

namespace SpinSim.Figures.Plots;

/// <summary>The same spin system at several fields, one trace above the other on a common ppm axis.</summary>
public static class StackedFieldsFigure
{
    private const double Step = 1.15; // vertical distance between baselines, in units of a trace's tallest point

    /// <summary>
    /// Traces stacked in the order given, the first at the top, each scaled to its own tallest point (the
    /// subtitle says so) and labelled in the left margin at its baseline. The ppm axis spans all traces.
    /// </summary>
    /// <exception cref="ArgumentException">No traces, a missing label, traces of different nuclei, or invalid options.</exception>
    public static PlotModel Create(IReadOnlyList<(string Label, SpectrumTrace Trace)> traces, FigureOptions options)
    {
        ArgumentNullException.ThrowIfNull(traces);
        ArgumentNullException.ThrowIfNull(options);
        if (traces.Count == 0) throw new ArgumentException("give at least one trace to stack", nameof(traces));
        for (var i = 0; i < traces.Count; i++)
        {
            if (traces[i].Trace is null) throw new ArgumentException($"trace {i} ('{traces[i].Label}') is null", nameof(traces));
            if (traces[i].Label is null) throw new ArgumentException($"trace {i} has no label; give e.g. \"400 MHz\"", nameof(traces));
        }
        var nucleus = traces[0].Trace.Nucleus;
        if (traces.FirstOrDefault(t => t.Trace.Nucleus != nucleus) is { Trace: not null } other)
            throw new ArgumentException($"'{other.Label}' observes {other.Trace.Nucleus} but '{traces[0].Label}' observes {nucleus}; a common ppm axis needs one nucleus", nameof(traces));

        var font = FigureStyle.FontUnits(options);
        var model = FigureStyle.NewModel(options, $"{FigureStyle.NucleusLabel(nucleus)} spectra at {traces.Count} fields");
        model.Subtitle = "each trace scaled to its tallest point";
        model.SubtitleFontSize = font * 0.9;

        var (minPpm, maxPpm) = FigureStyle.Range(traces.SelectMany(t => t.Trace.ShiftPpm));
        var ppmAxis = FigureStyle.PpmAxis(nucleus, minPpm, maxPpm);
        model.Axes.Add(ppmAxis);
        var n = traces.Count;
        model.Axes.Add(FigureStyle.HiddenVerticalAxis("stack", -0.08, (n - 1) * Step + 1.08));

        var labels = new List<(string, double)>();
        for (var i = 0; i < n; i++)
        {
            var (label, trace) = traces[i];
            var baseline = (n - 1 - i) * Step;
            var tallest = trace.Intensity.Max(Math.Abs);
            if (tallest == 0) tallest = 1;
            var y = trace.Intensity.Select(v => baseline + v / tallest).ToArray();
            model.Series.Add(FigureStyle.Line(FigureStyle.Points(trace.ShiftPpm, y),
                FigurePalette.Sequence[i % FigurePalette.Sequence.Count], FigurePalette.StyleSequence[i % FigurePalette.StyleSequence.Count],
                FigureStyle.TraceThickness, "stack", label));
            labels.Add((label, baseline + 0.15));
        }

        var margin = new MarginLabelsAnnotation(labels, leftSide: true, font) { XAxisKey = "ppm", YAxisKey = "stack" };
        model.Annotations.Add(margin);
        model.PlotMargins = new OxyThickness(margin.MarginWidth, double.NaN, font, double.NaN);
        FigureStyle.SetTicks([(ppmAxis, options.Resolve().WidthUnits - margin.MarginWidth - 2 * font)], font);
        return model;
    }

    /// <summary>Draws <see cref="Create"/> into <paramref name="output"/>.</summary>
    public static void Render(IReadOnlyList<(string Label, SpectrumTrace Trace)> traces, FigureOptions options, FigureFormat format, Stream output) =>
        FigureRenderer.Render(Create(traces, options), format, options, output);
}
