using OxyPlot;
using OxyPlot.Annotations;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>Annotations drawn in the margins may draw anywhere on the canvas; OxyPlot would clip them to the plot area.</summary>
internal abstract class MarginAnnotation : Annotation
{
    protected MarginAnnotation() => Layer = AnnotationLayer.AboveSeries;

    public override OxyRect GetClippingRect() => new(0, 0, PlotModel.Width, PlotModel.Height);
}

/// <summary>The title of a broken ppm axis, once, centred under the whole plot area below the tick labels.</summary>
internal sealed class MarginTextAnnotation(string text, double font) : MarginAnnotation
{
    public override void Render(IRenderContext rc)
    {
        var area = PlotModel.PlotArea;
        var y = area.Bottom + 7 + 4 + BundledFont.LineHeight(font) + 4;
        rc.DrawText(new ScreenPoint(area.Left + area.Width / 2, y), text, PlotModel.TextColor, PlotModel.DefaultFont, font,
            FontWeights.Normal, 0, HorizontalAlignment.Center, VerticalAlignment.Top);
    }
}

/// <summary>Pairs of slanted strokes on the ppm axis line where one panel of a broken axis ends and the next begins.</summary>
internal sealed class BreakMarksAnnotation(IReadOnlyList<(double Left, double Right)> fractions, double font) : MarginAnnotation
{
    public override void Render(IRenderContext rc)
    {
        var area = PlotModel.PlotArea;
        var h = font * 0.45;
        for (var i = 0; i + 1 < fractions.Count; i++)
            foreach (var f in new[] { fractions[i].Right, fractions[i + 1].Left })
            {
                var x = area.Left + f * area.Width;
                rc.DrawLine([new ScreenPoint(x - h * 0.4, area.Bottom + h), new ScreenPoint(x + h * 0.4, area.Bottom - h)],
                    FigurePalette.Ink, FigureStyle.AxisThickness, EdgeRenderingMode.PreferGeometricAccuracy);
            }
    }
}

/// <summary>A label inside the plot at the top left of one row's band ("400 MHz", "residual").</summary>
internal sealed class RowLabelAnnotation : MarginAnnotation
{
    private readonly string _text;
    private readonly double _font;

    public RowLabelAnnotation(string text, string xAxisKey, string yAxisKey, double font)
    {
        _text = text;
        _font = font;
        XAxisKey = xAxisKey;
        YAxisKey = yAxisKey;
    }

    public override void Render(IRenderContext rc)
    {
        var area = PlotModel.PlotArea;
        var y = YAxis!.Transform(YAxis.ActualMaximum);
        // A white ground keeps the label legible where a trace runs under it; it covers only the label's own box.
        var width = BundledFont.MeasureWidth(_text, _font);
        rc.DrawRectangle(new OxyRect(area.Left + _font * 0.15, y, width + _font * 0.3, BundledFont.LineHeight(_font) * 0.95),
            OxyColors.White, OxyColors.Undefined, 0, EdgeRenderingMode.Automatic);
        rc.DrawText(new ScreenPoint(area.Left + _font * 0.3, y), _text, PlotModel.TextColor, PlotModel.DefaultFont, _font,
            FontWeights.Normal, 0, HorizontalAlignment.Left, VerticalAlignment.Top);
    }
}

/// <summary>A note at the foot of the figure, wrapped to its width.</summary>
internal sealed class FootnoteAnnotation(string text, double font, double width) : MarginAnnotation
{
    private readonly IReadOnlyList<string> _lines = BundledFont.Wrap(text, font, width);

    public double Height => (_lines.Count + 0.3) * BundledFont.LineHeight(font);

    public override void Render(IRenderContext rc)
    {
        var y = PlotModel.Height - PlotModel.Padding.Bottom - _lines.Count * BundledFont.LineHeight(font);
        foreach (var line in _lines)
        {
            rc.DrawText(new ScreenPoint(PlotModel.Padding.Left, y), line, PlotModel.TextColor, PlotModel.DefaultFont, font, FontWeights.Normal);
            y += BundledFont.LineHeight(font);
        }
    }
}
