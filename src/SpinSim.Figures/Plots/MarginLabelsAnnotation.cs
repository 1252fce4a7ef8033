using OxyPlot;
using OxyPlot.Annotations;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>
/// Labels written in the margin beside the plot area, each level with a data height on the vertical axis.
/// Labels outside the plot never hide data, which text placed among peaks cannot promise.
/// </summary>
internal sealed class MarginLabelsAnnotation : Annotation
{
    private readonly (string Text, double Y)[] _labels;
    private readonly bool _leftSide;
    private readonly double _fontSize;

    /// <param name="labels">Text and the height on the annotation's vertical axis at which to centre it.</param>
    /// <param name="leftSide">True for the left margin (text ends at the plot), false for the right.</param>
    /// <param name="fontSize">Text size in OxyPlot units (1/96 inch).</param>
    public MarginLabelsAnnotation(IEnumerable<(string Text, double Y)> labels, bool leftSide, double fontSize)
    {
        _labels = labels.ToArray();
        _leftSide = leftSide;
        _fontSize = fontSize;
        Layer = AnnotationLayer.AboveSeries;
    }

    public double Gap => _fontSize * 0.8;

    /// <summary>Margin the labels need, in OxyPlot units.</summary>
    public double MarginWidth => (_labels.Length == 0 ? 0 : _labels.Max(l => BundledFont.MeasureWidth(l.Text, _fontSize))) + 2 * Gap;

    // OxyPlot clips annotations to the plot area by default; this one lives in the margin, so it may draw anywhere.
    public override OxyRect GetClippingRect() => new(0, 0, PlotModel.Width, PlotModel.Height);

    public override void Render(IRenderContext rc)
    {
        var area = PlotModel.PlotArea;
        var x = _leftSide ? area.Left - Gap : area.Right + Gap;
        foreach (var (text, y) in _labels)
            rc.DrawText(new ScreenPoint(x, YAxis!.Transform(y)), text, PlotModel.TextColor, PlotModel.DefaultFont, _fontSize,
                FontWeights.Normal, 0, _leftSide ? HorizontalAlignment.Right : HorizontalAlignment.Left, VerticalAlignment.Middle);
    }
}
