using OxyPlot;
using OxyPlot.Annotations;
using SpinSim.Core.Traces;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>
/// What a fit figure shows: the measured trace, the fitted intensities and the residual on the measured
/// trace's points (same length and order), the fitted parameters, and a title.
/// </summary>
public sealed record FitFigureData(
    SpectrumTrace Measured,
    double[] FittedIntensity,
    double[] Residual,
    IReadOnlyList<ParameterRow> Parameters,
    string Title)
{
    /// <summary>Heading of the error column (say what a second value in brackets is).</summary>
    public string ErrorHeading { get; init; } = "std. error";
}

/// <summary>A fit at a glance: measured and fitted spectra overlaid, the residual below, the parameters beside.</summary>
public static class FitFigure
{
    private const string MainAxis = "main", ResidualAxis = "residual";
    private const double ResidualTop = 0.22, MainBottom = 0.3;

    // Below this the table is no longer legible in print; further rows are summarised instead.
    private const double SmallestTableFontScale = 0.75;

    /// <summary>
    /// The fit figure. Intensities are divided by the largest |measured| value so the axis reads 0 to 1; the
    /// residual uses the same units and, when it fits, the same vertical scale as the spectra, so that its
    /// size can be judged by eye. The parameter table stands to the right of the plot.
    /// </summary>
    /// <exception cref="ArgumentException">Arrays whose length differs from the measured trace, a non-finite value, or invalid options.</exception>
    public static PlotModel Create(FitFigureData data, FigureOptions options)
    {
        ArgumentNullException.ThrowIfNull(data);
        ArgumentNullException.ThrowIfNull(options);
        var measured = data.Measured ?? throw new ArgumentException("the measured trace is required", nameof(data));
        CheckSameAxis(data.FittedIntensity, measured, nameof(FitFigureData.FittedIntensity));
        CheckSameAxis(data.Residual, measured, nameof(FitFigureData.Residual));
        var parameters = data.Parameters ?? [];

        var size = options.Resolve();
        var font = FigureStyle.FontUnits(options);
        var model = FigureStyle.NewModel(options, data.Title ?? "");

        var scale = measured.Intensity.Max(Math.Abs);
        if (scale == 0) scale = 1;
        var y = measured.Intensity.Select(v => v / scale).ToArray();
        var fitted = data.FittedIntensity.Select(v => v / scale).ToArray();
        var residual = data.Residual.Select(v => v / scale).ToArray();

        var (minPpm, maxPpm) = FigureStyle.Range(measured.ShiftPpm);
        model.Axes.Add(FigureStyle.PpmAxis(measured.Nucleus, minPpm, maxPpm));

        var (lo, hi) = FigureStyle.Range(y.Concat(fitted));
        lo = Math.Min(0, lo);
        if (hi <= lo) hi = lo + 1;
        var mainMin = lo - 0.03 * (hi - lo);
        var mainMax = hi + 0.05 * (hi - lo);
        model.Axes.Add(FigureStyle.VerticalAxis(MainAxis, "intensity (relative)", mainMin, mainMax, MainBottom, 1));

        // Same units per length as the spectra when the residual fits in its panel; otherwise its own range,
        // which the tick labels then make plain.
        var sameScaleHalf = (mainMax - mainMin) / (1 - MainBottom) * ResidualTop / 2;
        var largest = residual.Length == 0 ? 0 : residual.Max(Math.Abs);
        var half = largest <= 0.9 * sameScaleHalf ? sameScaleHalf : largest * 1.15;
        if (half == 0) half = 1;
        var residualAxis = FigureStyle.VerticalAxis(ResidualAxis, "residual", -half, half, 0, ResidualTop);
        residualAxis.MinorTickSize = 0; // a short panel has no room for minor ticks between its labels
        model.Axes.Add(residualAxis);

        model.Annotations.Add(new LineAnnotation
        {
            Type = LineAnnotationType.Horizontal,
            Y = 0,
            XAxisKey = "ppm",
            YAxisKey = ResidualAxis,
            Color = FigurePalette.Guide,
            LineStyle = LineStyle.Dot,
            StrokeThickness = FigureStyle.AxisThickness,
            Layer = AnnotationLayer.BelowSeries,
        });

        model.Series.Add(FigureStyle.Line(FigureStyle.Points(measured.ShiftPpm, y), FigurePalette.Measured, LineStyle.Solid,
            FigureStyle.TraceThickness, MainAxis, "measured"));
        model.Series.Add(FigureStyle.Line(FigureStyle.Points(measured.ShiftPpm, fitted), FigurePalette.Fitted, FigurePalette.FittedStyle,
            FigureStyle.TraceThickness * 1.2, MainAxis, "fitted"));
        var residualSeries = FigureStyle.Line(FigureStyle.Points(measured.ShiftPpm, residual), FigurePalette.Residual, LineStyle.Solid,
            FigureStyle.TraceThickness * 0.75, ResidualAxis, "residual");
        residualSeries.RenderInLegend = false; // named by its axis
        model.Series.Add(residualSeries);

        if (parameters.Count > 0)
        {
            var above = BundledFont.LineHeight(model.TitleFontSize) + model.TitlePadding + BundledFont.LineHeight(font) * 1.5;
            var table = ParameterTable(parameters, data.ErrorHeading, font, size.HeightUnits - model.Padding.Top - model.Padding.Bottom - above);
            model.Annotations.Add(table);
            model.PlotMargins = new OxyThickness(double.NaN, double.NaN, table.Width + 2 * table.Gap, double.NaN);
        }

        FigureLegend.AddAbove(model, font);
        return model;
    }

    /// <summary>Draws <see cref="Create"/> into <paramref name="output"/>.</summary>
    public static void Render(FitFigureData data, FigureOptions options, FigureFormat format, Stream output) =>
        FigureRenderer.Render(Create(data, options), format, options, output);

    // Long tables get smaller text, down to a legible floor; rows beyond that are summarised when drawn.
    // The height estimate leaves room for the title and the legend row above the plot area.
    private static SideTableAnnotation ParameterTable(IReadOnlyList<ParameterRow> parameters, string errorHeading, double font, double availableHeight)
    {
        var tableFont = font;
        while (SideTableAnnotation.RowsThatFit(availableHeight, tableFont) < parameters.Count && tableFont > font * SmallestTableFontScale)
            tableFont *= 0.95;
        var rows = parameters.Select(p => new[] { p.Name ?? "", p.Value ?? "", PlusMinus(p.StdError), p.Unit ?? "" }).ToArray();
        return new SideTableAnnotation("Fitted parameters", ["parameter", "value", errorHeading, "unit"], rows,
            [false, true, true, false], tableFont);
    }

    private static string PlusMinus(string? error) =>
        string.IsNullOrWhiteSpace(error) ? "" : error.TrimStart().StartsWith('±') ? error : "± " + error;

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
