using OxyPlot;
using OxyPlot.Annotations;
using OxyPlot.Axes;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Reporting;
using SpinSim.Core.Traces;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>
/// One fitted trace: the measured points, the model and the residual on the same points (same length and order), and the
/// label its row carries in a joint fit ("400 MHz").
/// </summary>
public sealed record FitFigureTrace(SpectrumTrace Measured, double[] FittedIntensity, double[] Residual, string Label);

/// <summary>
/// What a fit figure shows: one or more fitted traces (a joint fit gives one per field), the fitted regions (one panel
/// each on a broken ppm axis; none for one panel over the data), the excluded ranges (shaded), the parameter rows and a
/// title. <see cref="ShowTable"/> false leaves the table out (the HTML report has its own).
/// </summary>
public sealed record FitFigureData(IReadOnlyList<FitFigureTrace> Traces, IReadOnlyList<ParameterRow> Parameters, string Title)
{
    public IReadOnlyList<PpmRange> Regions { get; init; } = [];
    public IReadOnlyList<PpmRange> Excluded { get; init; } = [];
    public bool ShowTable { get; init; } = true;

    /// <summary>One trace, no regions: the common case.</summary>
    public FitFigureData(SpectrumTrace measured, double[] fitted, double[] residual, IReadOnlyList<ParameterRow> parameters, string title)
        : this([new FitFigureTrace(measured, fitted, residual, "")], parameters, title) { }
}

/// <summary>How a fit figure was laid out, for callers that must tell the user (a table left out) and for tests.</summary>
public sealed record FitFigureLayout(bool TableShown, int TableRows, int RowsLeftOut, string Note);

/// <summary>
/// A fit at a glance, from a journal column (80 mm) to a full page width (250 mm): measured and fitted spectra overlaid
/// with the residual below, one row per trace, one panel per fitted region on a broken ppm axis, and the spin
/// parameters in a table under the plot.
/// </summary>
public static class FitFigure
{
    /// <summary>The plot area keeps at least this share of the figure height; a table that would take more is left out.</summary>
    public const double MinPlotShare = 0.35;

    /// <summary>The smallest table text, as a fraction of the figure's text size, before the table is left out.</summary>
    public const double SmallestTableFontScale = 0.75;

    // Each trace row: the residual in the lowest 22 %, the spectra from 30 % up.
    private const double ResidualTop = 0.22, MainBottom = 0.3, RowGap = 0.06, PanelGap = 0.025, SmallestPanel = 0.12;

    /// <summary>Key of the vertical axis of trace <paramref name="t"/>'s spectra, and of its residual.</summary>
    public static string MainAxis(int t) => $"main{t}";
    public static string ResidualAxis(int t) => $"residual{t}";

    /// <summary>Key of the ppm axis of panel <paramref name="p"/> (panels from high ppm, on the left, to low).</summary>
    public static string PanelAxis(int p) => p == 0 ? "ppm" : $"ppm{p}";

    /// <summary>
    /// The fit figure. Intensities of each trace are divided by its largest |measured| value; the residual uses the same
    /// scale as the spectra when it fits its band, otherwise it is scaled down and labelled with the factor. Spin and
    /// width rows go in the table; nuisance rows (scale, baseline, offset, phase) are named in a note under it.
    /// </summary>
    /// <exception cref="ArgumentException">Arrays whose length differs from their measured trace, a non-finite value, no traces, or invalid options.</exception>
    public static PlotModel Create(FitFigureData data, FigureOptions options) => Build(data, options).Model;

    /// <summary>As <see cref="Create"/>, with what the layout decided.</summary>
    public static (PlotModel Model, FitFigureLayout Layout) Build(FitFigureData data, FigureOptions options)
    {
        ArgumentNullException.ThrowIfNull(data);
        ArgumentNullException.ThrowIfNull(options);
        if (data.Traces is not { Count: > 0 } traces) throw new ArgumentException("give at least one fitted trace", nameof(data));
        foreach (var t in traces)
        {
            var measured = t.Measured ?? throw new ArgumentException("the measured trace is required", nameof(data));
            CheckSameAxis(t.FittedIntensity, measured, "FittedIntensity");
            CheckSameAxis(t.Residual, measured, "Residual");
        }
        var size = options.Resolve();
        var font = FigureStyle.FontUnits(options);
        var model = FigureStyle.NewModel(options, data.Title ?? "");
        var nucleus = traces[0].Measured.Nucleus;

        var panels = Panels(data);
        var plotWidth = size.WidthUnits - 2 * model.Padding.Left - font * 1.5;
        var fractions = PanelFractions(panels);
        var ppmAxes = new List<(LinearAxis Axis, double WidthUnits)>();
        for (var p = 0; p < panels.Count; p++)
        {
            var axis = FigureStyle.PpmAxis(nucleus, panels[p].Low, panels[p].High);
            axis.Key = PanelAxis(p);
            // Reversed: high ppm at the panel's left edge. Positions are fractions of the plot width from the left.
            axis.StartPosition = fractions[p].Right;
            axis.EndPosition = fractions[p].Left;
            axis.Title = null;
            model.Axes.Add(axis);
            ppmAxes.Add((axis, plotWidth * (fractions[p].Right - fractions[p].Left)));
        }
        FigureStyle.SetTicks(ppmAxes, font);

        // Rows: the first trace at the top.
        var rowHeight = (1 - RowGap * (traces.Count - 1)) / traces.Count;
        for (var t = 0; t < traces.Count; t++)
        {
            var bottom = (traces.Count - 1 - t) * (rowHeight + RowGap);
            AddTraceRow(model, traces[t], t, bottom, rowHeight, panels, data.Excluded, font, first: t == 0);
        }

        // The axis title once, under the whole plot; break marks where panels meet.
        model.Annotations.Add(new MarginTextAnnotation($"δ({FigureStyle.NucleusLabel(nucleus)}) / ppm", font));
        if (panels.Count > 1) model.Annotations.Add(new BreakMarksAnnotation(fractions, font));

        // The table goes under the plot when it leaves the plot its share; rows are never cut.
        var shown = (data.Parameters ?? []).Where(r => r.Group != ParameterGroup.Nuisance).ToList();
        var nuisance = (data.Parameters ?? []).Where(r => r.Group == ParameterGroup.Nuisance).ToList();
        var note = nuisance.Count == 0 ? "" : $"Also fitted: {NuisanceSummary(nuisance)} (in the report).";
        var axisSpace = AxisSpace(font);
        var inner = size.HeightUnits - model.Padding.Top - model.Padding.Bottom;
        var above = (string.IsNullOrEmpty(model.Title) ? 0 : BundledFont.LineHeight(model.TitleFontSize) + model.TitlePadding)
                    + BundledFont.LineHeight(font) * 1.4; // the legend row
        var layout = new FitFigureLayout(false, 0, 0, "");
        if (data.ShowTable && shown.Count > 0)
        {
            var room = inner - above - axisSpace - MinPlotShare * size.HeightUnits;
            // The table starts at the plot's left edge (padding plus the plot's left margin) and must end inside the right padding.
            var tableWidth = size.WidthUnits - model.Padding.Left - model.Padding.Right - font * 1.5;
            var table = ParameterTableAnnotation.Layout(shown, note, font, SmallestTableFontScale, tableWidth, room);
            if (table is not null)
            {
                table.Origin = m => new ScreenPoint(m.PlotArea.Left, m.PlotArea.Bottom + axisSpace);
                model.Annotations.Add(table);
                model.PlotMargins = new OxyThickness(font * 1.5, double.NaN, font * 1.5, axisSpace + table.Height);
                layout = new FitFigureLayout(true, table.RowCount, 0, note);
            }
            else
            {
                var leftOut = $"Table of the {shown.Count} fitted parameters left out: it does not fit at this size (see the report, or make the figure taller).";
                var footnote = new FootnoteAnnotation(leftOut, font * 0.9, size.WidthUnits - 2 * model.Padding.Left);
                model.Annotations.Add(footnote);
                model.PlotMargins = new OxyThickness(font * 1.5, double.NaN, font * 1.5, axisSpace + footnote.Height);
                layout = new FitFigureLayout(false, 0, shown.Count, leftOut);
            }
        }
        else model.PlotMargins = new OxyThickness(font * 1.5, double.NaN, font * 1.5, axisSpace);

        FigureLegend.AddAbove(model, font);
        return (model, layout);
    }

    /// <summary>Draws <see cref="Create"/> into <paramref name="output"/>.</summary>
    public static void Render(FitFigureData data, FigureOptions options, FigureFormat format, Stream output) =>
        FigureRenderer.Render(Create(data, options), format, options, output);

    /// <summary>Height in layout units of the tick marks, tick labels and axis title under the plot area.</summary>
    public static double AxisSpace(double font) => 7 + 4 + BundledFont.LineHeight(font) + 4 + BundledFont.LineHeight(font) + font * 0.6;

    private static void AddTraceRow(PlotModel model, FitFigureTrace trace, int t, double bottom, double height,
        IReadOnlyList<PpmRange> panels, IReadOnlyList<PpmRange> excluded, double font, bool first)
    {
        var measured = trace.Measured;
        var scale = measured.Intensity.Max(Math.Abs);
        if (scale == 0) scale = 1;
        var y = measured.Intensity.Select(v => v / scale).ToArray();
        var fitted = trace.FittedIntensity.Select(v => v / scale).ToArray();
        var residual = trace.Residual.Select(v => v / scale).ToArray();

        var (lo, hi) = FigureStyle.Range(y.Concat(fitted));
        lo = Math.Min(0, lo);
        if (hi <= lo) hi = lo + 1;
        var mainMin = lo - 0.03 * (hi - lo);
        var mainMax = hi + 0.12 * (hi - lo); // room for the row's label inside the plot
        model.Axes.Add(FigureStyle.HiddenVerticalAxis(MainAxis(t), mainMin, mainMax, bottom + MainBottom * height, bottom + height));

        // Same units per length as the spectra when the residual fits its band; otherwise scaled down, and the label says by how much.
        var sameScaleHalf = (mainMax - mainMin) / (1 - MainBottom) * ResidualTop / 2;
        var largest = residual.Length == 0 ? 0 : residual.Max(Math.Abs);
        var factor = largest <= 0.9 * sameScaleHalf ? 1 : 1 / FigureStyle.NiceStep(largest * 1.15 / sameScaleHalf);
        model.Axes.Add(FigureStyle.HiddenVerticalAxis(ResidualAxis(t), -sameScaleHalf / factor, sameScaleHalf / factor, bottom, bottom + ResidualTop * height));

        for (var p = 0; p < panels.Count; p++)
        {
            var key = PanelAxis(p);
            var inside = Enumerable.Range(0, measured.Count).Where(i => panels[p].Contains(measured.ShiftPpm[i])).ToArray();
            var ppm = inside.Select(i => measured.ShiftPpm[i]).ToArray();
            var show = first && p == 0;
            foreach (var range in excluded)
            {
                var a = Math.Max(range.Low, panels[p].Low);
                var b = Math.Min(range.High, panels[p].High);
                if (b <= a) continue;
                foreach (var axis in new[] { MainAxis(t), ResidualAxis(t) })
                    model.Annotations.Add(new RectangleAnnotation
                    {
                        MinimumX = a, MaximumX = b, XAxisKey = key, YAxisKey = axis,
                        Fill = FigurePalette.Excluded, Layer = AnnotationLayer.BelowSeries,
                    });
            }
            // The zero line follows the data: broken wherever the trace is (between regions, over excluded ranges).
            var zero = FigureStyle.Line(FigureStyle.Points(ppm, new double[ppm.Length]), FigurePalette.Guide, LineStyle.Dot,
                FigureStyle.AxisThickness, ResidualAxis(t));
            zero.XAxisKey = key;
            zero.RenderInLegend = false;
            model.Series.Add(zero);
            foreach (var (values, color, style, thickness, axis, title) in new[]
                     {
                         (y, FigurePalette.Measured, LineStyle.Solid, FigureStyle.TraceThickness, MainAxis(t), "measured"),
                         (fitted, FigurePalette.Fitted, FigurePalette.FittedStyle, FigureStyle.TraceThickness * 1.2, MainAxis(t), "fitted"),
                         (residual, FigurePalette.Residual, LineStyle.Solid, FigureStyle.TraceThickness * 0.75, ResidualAxis(t), "residual"),
                     })
            {
                var series = FigureStyle.Line(FigureStyle.Points(ppm, inside.Select(i => values[i]).ToArray()), color, style, thickness, axis, title);
                series.XAxisKey = key;
                series.RenderInLegend = show && title != "residual"; // the residual is named in its band
                model.Series.Add(series);
            }
        }

        var residualLabel = factor == 1 ? "residual" : $"residual ×{factor:0.###}";
        model.Annotations.Add(new RowLabelAnnotation(residualLabel, PanelAxis(0), ResidualAxis(t), font * 0.85));
        if (!string.IsNullOrEmpty(trace.Label))
            model.Annotations.Add(new RowLabelAnnotation(trace.Label, PanelAxis(0), MainAxis(t), font));
    }

    // Regions clipped to the data, overlapping ones merged, from high ppm to low; one panel over all data without regions.
    private static List<PpmRange> Panels(FitFigureData data)
    {
        var all = data.Traces.SelectMany(t => t.Measured.ShiftPpm).ToArray();
        var (min, max) = FigureStyle.Range(all);
        if (max <= min) (min, max) = (min - 0.5, max + 0.5);
        var regions = (data.Regions ?? []).Select(r => new PpmRange(Math.Min(r.High, max), Math.Max(r.Low, min)))
            .Where(r => r.A > r.B && all.Any(r.Contains)).OrderByDescending(r => r.High).ToList();
        if (regions.Count == 0) return [new PpmRange(max, min)];
        var merged = new List<PpmRange> { regions[0] };
        foreach (var r in regions.Skip(1))
        {
            if (r.High >= merged[^1].Low) merged[^1] = new PpmRange(merged[^1].High, Math.Min(merged[^1].Low, r.Low));
            else merged.Add(r);
        }
        // Trim each panel to the data inside it, so no panel is mostly empty axis.
        return merged.Select(r =>
        {
            var (lo, hi) = FigureStyle.Range(all.Where(r.Contains));
            return new PpmRange(hi, lo);
        }).ToList();
    }

    // Panel widths in proportion to their ppm spans, each at least SmallestPanel of the width, with gaps between.
    private static (double Left, double Right)[] PanelFractions(IReadOnlyList<PpmRange> panels)
    {
        var usable = 1 - PanelGap * (panels.Count - 1);
        var spans = panels.Select(p => Math.Max(p.High - p.Low, 1e-9)).ToArray();
        var shares = spans.Select(s => s / spans.Sum()).ToArray();
        for (var pass = 0; pass < 3; pass++)
        {
            var small = shares.Select(s => s < SmallestPanel).ToArray();
            var fixedShare = small.Count(x => x) * SmallestPanel;
            var rest = spans.Where((_, i) => !small[i]).Sum();
            shares = shares.Select((s, i) => small[i] ? SmallestPanel : spans[i] / rest * (1 - fixedShare)).ToArray();
        }
        var result = new (double, double)[panels.Count];
        var x = 0.0;
        for (var i = 0; i < panels.Count; i++)
        {
            result[i] = (x, x + shares[i] * usable);
            x += shares[i] * usable + PanelGap;
        }
        return result;
    }

    private static string NuisanceSummary(List<ParameterRow> rows)
    {
        var kinds = rows.Select(r => r.Label.Split([',', '/', ' ', '['], 2)[0]).Distinct().ToList();
        return kinds.Count switch
        {
            1 => kinds[0],
            _ => string.Join(", ", kinds.Take(kinds.Count - 1)) + " and " + kinds[^1],
        };
    }

    private static void CheckSameAxis(double[]? values, SpectrumTrace measured, string name)
    {
        if (values is null) throw new ArgumentException($"{name} is required", name);
        if (values.Length != measured.Count)
            throw new ArgumentException($"{name} has {values.Length} points but the measured trace has {measured.Count}; they must share its axis", name);
        for (var i = 0; i < values.Length; i++)
            if (!double.IsFinite(values[i]))
                throw new ArgumentException($"{name}[{i}] is {values[i]}; every value must be finite", name);
    }
}
