using OxyPlot;
using OxyPlot.Axes;
using OxyPlot.Series;
using SpinSim.Core.Reporting;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>What all figures share: fonts, axes and line weights, so that they look alike side by side in a paper.</summary>
internal static class FigureStyle
{
    /// <summary>OxyPlot sizes text in 1/96 inch; options give points (1/72 inch).</summary>
    public const double UnitsPerPoint = 96.0 / 72.0;

    public const double TraceThickness = 1.0;
    public const double AxisThickness = 0.75;

    public static double FontUnits(FigureOptions options) => options.FontSizePt * UnitsPerPoint;

    /// <summary>A white model with the bundled font at the options' size and the given default title.</summary>
    public static PlotModel NewModel(FigureOptions options, string defaultTitle)
    {
        var size = options.Resolve(); // refuse bad options when the figure is built, not only when it is drawn
        var font = FontUnits(options);
        // A title wider than the figure is broken into lines rather than cut at the edges.
        var title = string.Join("\n", BundledFont.Wrap(options.Title ?? defaultTitle ?? "", font * 1.15, size.WidthUnits - 2 * font));
        return new PlotModel
        {
            Title = title,
            TitleHorizontalAlignment = TitleHorizontalAlignment.CenteredWithinView,
            TitleFontSize = font * 1.15,
            TitleFontWeight = FontWeights.Bold,
            DefaultFont = BundledFont.FamilyName,
            DefaultFontSize = font,
            TextColor = FigurePalette.Ink,
            TitleColor = FigurePalette.Ink,
            Background = OxyColors.White,
            PlotAreaBackground = OxyColors.Undefined,
            // An open frame (axis lines only) reads better in print than a closed box.
            PlotAreaBorderThickness = new OxyThickness(0),
            Padding = new OxyThickness(font * 0.8),
            IsLegendVisible = false,
        };
    }

    /// <summary>The chemical-shift axis, high ppm on the left as is usual for NMR spectra.</summary>
    public static LinearAxis PpmAxis(string nucleus, double minPpm, double maxPpm)
    {
        if (maxPpm <= minPpm) (minPpm, maxPpm) = (minPpm - 0.5, maxPpm + 0.5); // a single point still gets an axis
        return new LinearAxis
        {
            Key = "ppm",
            Position = AxisPosition.Bottom,
            StartPosition = 1,
            EndPosition = 0,
            Minimum = minPpm,
            Maximum = maxPpm,
            Title = $"δ({NucleusLabel(nucleus)}) / ppm",
            TickStyle = TickStyle.Outside,
            AxislineStyle = LineStyle.Solid,
            AxislineThickness = AxisThickness,
            MajorGridlineStyle = LineStyle.None,
            MinorGridlineStyle = LineStyle.None,
            IsZoomEnabled = false,
            IsPanEnabled = false,
        };
    }

    /// <summary>A vertical axis that scales data but draws nothing: spectrum intensities are in arbitrary units.</summary>
    public static LinearAxis HiddenVerticalAxis(string key, double min, double max, double start = 0, double end = 1) => new()
    {
        Key = key,
        Position = AxisPosition.Left,
        IsAxisVisible = false,
        Minimum = min,
        Maximum = max,
        StartPosition = start,
        EndPosition = end,
        IsZoomEnabled = false,
        IsPanEnabled = false,
    };

    /// <summary>A visible vertical axis for a panel occupying <paramref name="start"/> to <paramref name="end"/> of the plot height.</summary>
    public static LinearAxis VerticalAxis(string key, string title, double min, double max, double start, double end) => new()
    {
        Key = key,
        Position = AxisPosition.Left,
        Title = title,
        Minimum = min,
        Maximum = max,
        StartPosition = start,
        EndPosition = end,
        TickStyle = TickStyle.Outside,
        AxislineStyle = LineStyle.Solid,
        AxislineThickness = AxisThickness,
        MajorGridlineStyle = LineStyle.None,
        MinorGridlineStyle = LineStyle.None,
        IsZoomEnabled = false,
        IsPanEnabled = false,
    };

    public static LineSeries Line(IEnumerable<DataPoint> points, OxyColor color, LineStyle style, double thickness,
        string yAxisKey, string title = "")
    {
        var series = new LineSeries
        {
            Color = color,
            LineStyle = style,
            StrokeThickness = thickness,
            Title = title,
            XAxisKey = "ppm",
            YAxisKey = yAxisKey,
            LineJoin = LineJoin.Round,
            CanTrackerInterpolatePoints = false,
        };
        series.Points.AddRange(points);
        return series;
    }

    /// <summary>
    /// Points of a trace in increasing ppm, so that lines are drawn in one sweep across the axis. Where points are missing
    /// (between fitted regions, or an excluded interval) the line is broken rather than drawn across the gap.
    /// </summary>
    public static IEnumerable<DataPoint> Points(double[] ppm, double[] y)
    {
        var order = Enumerable.Range(0, ppm.Length).OrderBy(i => ppm[i]).ToArray();
        var steps = order.Skip(1).Select((i, k) => ppm[i] - ppm[order[k]]).Where(d => d > 0).Order().ToArray();
        var gap = steps.Length == 0 ? double.PositiveInfinity : 10 * steps[steps.Length / 2];
        for (var k = 0; k < order.Length; k++)
        {
            if (k > 0 && ppm[order[k]] - ppm[order[k - 1]] > gap) yield return DataPoint.Undefined;
            yield return new DataPoint(ppm[order[k]], y[order[k]]);
        }
    }

    /// <summary>"1H" as "¹H": mass numbers are written as superscripts.</summary>
    public static string NucleusLabel(string nucleus) => Typography.Isotope(nucleus);

    /// <summary>
    /// Tick steps of 1, 2 or 5 times a power of ten (0.1, 0.2, 0.5, 1 ppm on a whole spectrum; 0.01, 0.02, 0.05 on one
    /// multiplet), the smallest that leaves each label about three label widths of room, and one number of decimals for all
    /// the given axes (the panels of a broken axis read alike). Labels use the true minus sign.
    /// </summary>
    /// <param name="panels">Each axis with the width in layout units it will be drawn over (an estimate is enough).</param>
    public static void SetTicks(IReadOnlyList<(LinearAxis Axis, double WidthUnits)> panels, double font)
    {
        var steps = panels.Select(p =>
        {
            var span = Math.Abs(p.Axis.Maximum - p.Axis.Minimum);
            var label = BundledFont.MeasureWidth("00.00", font) + font;
            var room = Math.Max(1, p.WidthUnits / (label * 1.25));
            return NiceStep(span / room);
        }).ToArray();
        var decimals = steps.Length == 0 ? 0 : steps.Max(s => Math.Max(0, (int)-Math.Floor(Math.Log10(s) + 1e-9)));
        for (var i = 0; i < panels.Count; i++)
        {
            var axis = panels[i].Axis;
            axis.MajorStep = steps[i];
            var leading = steps[i] / Math.Pow(10, Math.Floor(Math.Log10(steps[i]) + 1e-9));
            axis.MinorStep = steps[i] / (Math.Round(leading) == 2 ? 4 : 5);
            var format = "F" + decimals;
            axis.LabelFormatter = v =>
            {
                var r = Math.Round(v, decimals);
                return Typography.TrueMinus((r == 0 ? 0 : r).ToString(format, System.Globalization.CultureInfo.InvariantCulture)); // no "−0.0"
            };
        }
    }

    /// <summary>Tick labels of <paramref name="axis"/> with the true minus sign.</summary>
    public static void TrueMinusLabels(Axis axis) =>
        axis.LabelFormatter = v => Typography.TrueMinus(v.ToString("0.###", System.Globalization.CultureInfo.InvariantCulture));

    /// <summary>The largest of 1, 2, 5 x 10^k not above <paramref name="atMost"/>, and at least 1 (expansion factors).</summary>
    public static double NiceStepBelow(double atMost)
    {
        if (!(atMost > 1) || !double.IsFinite(atMost)) return 1;
        var decade = Math.Pow(10, Math.Floor(Math.Log10(atMost)));
        foreach (var m in new[] { 5.0, 2.0, 1.0 })
            if (m * decade <= atMost * (1 + 1e-9)) return m * decade;
        return decade;
    }

    /// <summary>The smallest of 1, 2, 5 x 10^k not below <paramref name="atLeast"/>.</summary>
    public static double NiceStep(double atLeast)
    {
        if (!(atLeast > 0) || !double.IsFinite(atLeast)) return 1;
        var decade = Math.Pow(10, Math.Floor(Math.Log10(atLeast)));
        foreach (var m in new[] { 1.0, 2.0, 5.0, 10.0 })
            if (m * decade >= atLeast * (1 - 1e-9)) return m * decade;
        return 10 * decade;
    }

    /// <summary>Smallest and largest value, ignoring nothing (inputs are finite by construction).</summary>
    public static (double Min, double Max) Range(IEnumerable<double> values)
    {
        double min = double.PositiveInfinity, max = double.NegativeInfinity;
        foreach (var v in values) { if (v < min) min = v; if (v > max) max = v; }
        return (min, max);
    }
}
