using System.Globalization;
using OxyPlot;
using OxyPlot.Annotations;
using OxyPlot.Axes;
using OxyPlot.Series;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>
/// The first-order splitting diagram of one nucleus: each coupling to n equivalent partners splits every line
/// into n + 1 lines J apart with binomial weights, level by level, ending in the multiplet.
/// </summary>
public static class CouplingTreeFigure
{
    /// <summary>More lines than this cannot be drawn legibly; group the couplings or draw fewer.</summary>
    public const int MaxLines = 4096;

    private const string HzAxis = "hz", TreeAxis = "tree";
    private const double MultipletBase = -1.6, MultipletHeight = 1.3;

    // Lines closer than this coincide: first-order positions are sums of J multiples, exact up to rounding.
    private const double CoincidenceHz = 1e-6;

    /// <summary>
    /// The splitting diagram of <paramref name="nucleusLabel"/>, couplings applied in the order given (largest
    /// first gives the usual tree). The x axis is the offset from <paramref name="centreHz"/> in Hz, increasing
    /// to the left like the ppm axis; the sign of J does not change a first-order pattern, so |J| is used.
    /// The bottom row is the multiplet, stick heights proportional to the binomial weights, labelled with them
    /// when they have room.
    /// </summary>
    /// <exception cref="ArgumentException">A non-finite J, a count below 1, more than <see cref="MaxLines"/> lines, or invalid options.</exception>
    /// <param name="secondOrderWarning">When first order does not hold, the sentence that says so (with |Δν/J|); it is
    /// written in the figure under the title, so the diagram cannot be shown without it.</param>
    public static PlotModel Create(string nucleusLabel, double centreHz, IReadOnlyList<(string Partner, double JHz, int Count)> couplings,
        FigureOptions options, string? secondOrderWarning = null)
    {
        ArgumentNullException.ThrowIfNull(nucleusLabel);
        ArgumentNullException.ThrowIfNull(couplings);
        ArgumentNullException.ThrowIfNull(options);
        if (!double.IsFinite(centreHz)) throw new ArgumentException($"centre must be a finite frequency, got {centreHz}", nameof(centreHz));
        var lineCount = 1L;
        foreach (var (partner, j, count) in couplings)
        {
            if (!double.IsFinite(j)) throw new ArgumentException($"J to {partner} is {j}; it must be finite", nameof(couplings));
            if (count < 1) throw new ArgumentException($"{partner}: a coupling needs at least one partner, got {count}", nameof(couplings));
            lineCount *= count + 1;
            if (lineCount > MaxLines)
                throw new ArgumentException($"the tree would have more than {MaxLines} lines; draw fewer couplings or group equivalent partners", nameof(couplings));
        }

        var font = FigureStyle.FontUnits(options);
        nucleusLabel = Core.Reporting.Typography.Primes(nucleusLabel);
        couplings = couplings.Select(c => (Core.Reporting.Typography.Primes(c.Partner), c.JHz, c.Count)).ToList();
        var model = FigureStyle.NewModel(options, $"First-order splitting of {nucleusLabel}");
        if (!string.IsNullOrWhiteSpace(secondOrderWarning))
        {
            // Wrapped to the figure width: the warning is part of the figure and must not run off it.
            var width = options.Resolve().WidthUnits - 2 * font;
            model.Subtitle = string.Join("\n", BundledFont.Wrap(secondOrderWarning, font * 0.95, width));
            model.SubtitleFontSize = font * 0.95;
            model.SubtitleColor = FigurePalette.Vermillion;
        }
        var levels = couplings.Count;

        // Tree: level i (before coupling i) at height levels - i; lines as (offset, weight).
        var lines = new List<(double X, double W)> { (0, 1) };
        var tree = new LineSeries { Color = FigurePalette.Ink, StrokeThickness = FigureStyle.AxisThickness, XAxisKey = HzAxis, YAxisKey = TreeAxis };
        AddSegment(tree, 0, levels + 0.3, 0, levels);
        for (var i = 0; i < levels; i++)
        {
            var (_, j, n) = couplings[i];
            var top = levels - i;
            var next = new List<(double, double)>(lines.Count * (n + 1));
            foreach (var (x, w) in lines)
            {
                AddSegment(tree, x, top, x, top - 0.25);
                for (var k = 0; k <= n; k++)
                {
                    var child = x + (k - n / 2.0) * Math.Abs(j);
                    AddSegment(tree, x, top - 0.25, child, top - 0.75);
                    AddSegment(tree, child, top - 0.75, child, top - 1);
                    next.Add((child, w * Binomial(n, k)));
                }
            }
            lines = next;
        }

        var multiplet = lines.OrderBy(l => l.X)
            .Aggregate(new List<(double X, double W)>(), (acc, l) =>
            {
                if (acc.Count > 0 && Math.Abs(acc[^1].X - l.X) < CoincidenceHz) acc[^1] = (acc[^1].X, acc[^1].W + l.W);
                else acc.Add(l);
                return acc;
            });

        var extent = Math.Max(multiplet.Max(l => Math.Abs(l.X)), 1.0);
        var hzAxis = new LinearAxis
        {
            Key = HzAxis,
            Position = AxisPosition.Bottom,
            StartPosition = 1, // higher frequency on the left, as on the ppm axis
            EndPosition = 0,
            Minimum = -extent * 1.15,
            Maximum = extent * 1.15,
            Title = string.Create(CultureInfo.InvariantCulture, $"Δν / Hz, from {centreHz:0.##} Hz"),
            TickStyle = TickStyle.Outside,
            AxislineStyle = LineStyle.Solid,
            AxislineThickness = FigureStyle.AxisThickness,
            IsZoomEnabled = false,
            IsPanEnabled = false,
        };
        FigureStyle.TrueMinusLabels(hzAxis);
        model.Axes.Add(hzAxis);
        model.Axes.Add(FigureStyle.HiddenVerticalAxis(TreeAxis, MultipletBase - 0.15, levels + 0.45));
        model.Series.Add(tree);

        var baseline = new LineSeries { Color = FigurePalette.Guide, StrokeThickness = FigureStyle.AxisThickness, XAxisKey = HzAxis, YAxisKey = TreeAxis };
        baseline.Points.Add(new DataPoint(-extent * 1.1, MultipletBase));
        baseline.Points.Add(new DataPoint(extent * 1.1, MultipletBase));
        model.Series.Add(baseline);

        // Thicker and coloured: the multiplet stays distinct from the thin black tree in grey print.
        var tallest = multiplet.Max(l => l.W);
        var sticks = new StemSeries
        {
            Color = FigurePalette.Vermillion,
            StrokeThickness = FigureStyle.TraceThickness * 1.5,
            Base = MultipletBase,
            XAxisKey = HzAxis,
            YAxisKey = TreeAxis,
        };
        sticks.Points.AddRange(multiplet.Select(l => new DataPoint(l.X, MultipletBase + MultipletHeight * l.W / tallest)));
        model.Series.Add(sticks);
        AddWeightLabels(model, multiplet, tallest, font, extent, options);

        var labels = new List<(string, double)> { (nucleusLabel, levels + 0.15) };
        for (var i = 0; i < levels; i++)
        {
            var (partner, j, n) = couplings[i];
            var who = n > 1 ? $"{partner} ({n})" : partner;
            labels.Add((string.Create(CultureInfo.InvariantCulture, $"{who}: J = {Math.Abs(j):0.0#} Hz"), levels - i - 0.5));
        }
        labels.Add(($"multiplet: {PatternName(couplings)}", MultipletBase + MultipletHeight / 2));
        // The labels take at most 40 % of the width: smaller text on a narrow figure, down to 70 % of the size.
        var labelFont = font;
        var widthUnits = options.Resolve().WidthUnits;
        while (new MarginLabelsAnnotation(labels, false, labelFont).MarginWidth > 0.4 * widthUnits && labelFont > 0.7 * font) labelFont *= 0.95;
        var margin = new MarginLabelsAnnotation(labels, leftSide: false, labelFont) { XAxisKey = HzAxis, YAxisKey = TreeAxis };
        model.Annotations.Add(margin);
        model.PlotMargins = new OxyThickness(font, double.NaN, margin.MarginWidth, double.NaN);
        return model;
    }

    /// <summary>Draws <see cref="Create"/> into <paramref name="output"/>.</summary>
    public static void Render(string nucleusLabel, double centreHz, IReadOnlyList<(string Partner, double JHz, int Count)> couplings,
        FigureOptions options, FigureFormat format, Stream output) =>
        FigureRenderer.Render(Create(nucleusLabel, centreHz, couplings, options), format, options, output);

    /// <summary>The usual letters for a first-order pattern (<see cref="Core.Reporting.NmrDataLine.Multiplicity"/>), "s" when nothing splits.</summary>
    public static string PatternName(IReadOnlyList<(string Partner, double JHz, int Count)> couplings) =>
        Core.Reporting.NmrDataLine.Multiplicity(couplings.Select(c => (c.JHz, c.Count)).ToList());

    // Weights are whole numbers; writing them over the sticks shows the 1:2:1 of a triplet directly, when
    // neighbouring labels have room.
    private static void AddWeightLabels(PlotModel model, List<(double X, double W)> multiplet, double tallest, double font,
        double extent, FigureOptions options)
    {
        var size = options.Resolve();
        var hzPerUnit = 2.3 * extent / (size.WidthUnits * 0.6);
        var widest = multiplet.Max(l => BundledFont.MeasureWidth(l.W.ToString("0", CultureInfo.InvariantCulture), font));
        var spacing = multiplet.Count < 2 ? double.PositiveInfinity : multiplet.Zip(multiplet.Skip(1), (a, b) => b.X - a.X).Min();
        if (spacing < (widest + font * 0.4) * hzPerUnit) return;
        foreach (var (x, w) in multiplet)
            model.Annotations.Add(new TextAnnotation
            {
                Text = w.ToString("0", CultureInfo.InvariantCulture),
                TextPosition = new DataPoint(x, MultipletBase + MultipletHeight * w / tallest),
                Offset = new ScreenVector(0, -font * 0.3),
                TextHorizontalAlignment = HorizontalAlignment.Center,
                TextVerticalAlignment = VerticalAlignment.Bottom,
                StrokeThickness = 0,
                Background = OxyColors.Undefined,
                TextColor = FigurePalette.Ink,
                FontSize = font * 0.85,
                XAxisKey = HzAxis,
                YAxisKey = TreeAxis,
                ClipByYAxis = false,
            });
    }

    // One polyline for the whole tree, segments separated by an invalid point, which LineSeries leaves as a gap.
    private static void AddSegment(LineSeries series, double x0, double y0, double x1, double y1)
    {
        series.Points.Add(new DataPoint(x0, y0));
        series.Points.Add(new DataPoint(x1, y1));
        series.Points.Add(DataPoint.Undefined);
    }

    private static double Binomial(int n, int k)
    {
        var r = 1.0;
        for (var i = 1; i <= k; i++) r = r * (n - k + i) / i;
        return Math.Round(r);
    }
}
