using OxyPlot;
using OxyPlot.Annotations;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>
/// A small ruled table drawn in the margin to the right of the plot area. OxyPlot has no table element;
/// drawing the cells as text in screen units keeps the table the same size whatever the data range,
/// and the figure reserves the margin from <see cref="Width"/>, measured with the same bundled font. Rows
/// that do not fit above the bottom of the figure are summarised in a last row ("… 12 more").
/// </summary>
internal sealed class SideTableAnnotation : Annotation
{
    private readonly string _caption;
    private readonly string[] _header;
    private readonly string[][] _rows;
    private readonly bool[] _rightAligned;
    private readonly double _fontSize;
    private readonly double[] _columnWidths;

    /// <param name="rightAligned">Per column: numbers are right-aligned so their digits line up.</param>
    /// <param name="fontSize">Text size in OxyPlot units (1/96 inch).</param>
    public SideTableAnnotation(string caption, string[] header, string[][] rows, bool[] rightAligned, double fontSize)
    {
        _caption = caption;
        _header = header;
        _rows = rows;
        _rightAligned = rightAligned;
        _fontSize = fontSize;
        _columnWidths = Enumerable.Range(0, header.Length)
            .Select(c => rows.Select(r => r[c]).Append(header[c]).Append(c == 0 ? More(rows.Length) : "")
                .Max(t => BundledFont.MeasureWidth(t, fontSize)))
            .ToArray();
        Layer = AnnotationLayer.AboveSeries;
    }

    /// <summary>Space between the plot area and the table, and between columns.</summary>
    public double Gap => _fontSize;

    private double ColumnGap => _fontSize * 0.8;

    private double RowHeight => BundledFont.LineHeight(_fontSize) * 1.1;

    /// <summary>Width of the table in OxyPlot units.</summary>
    public double Width => Math.Max(_columnWidths.Sum() + ColumnGap * (_columnWidths.Length - 1), BundledFont.MeasureWidth(_caption, _fontSize));

    /// <summary>Rows of text that fit a height of <paramref name="available"/> units at <paramref name="fontSize"/>, besides caption and header.</summary>
    public static int RowsThatFit(double available, double fontSize) =>
        Math.Max(0, (int)Math.Floor((available - fontSize * 0.6) / (BundledFont.LineHeight(fontSize) * 1.1)) - 2);

    // OxyPlot clips annotations to the plot area by default; this one lives in the margin, so it may draw anywhere.
    public override OxyRect GetClippingRect() => new(0, 0, PlotModel.Width, PlotModel.Height);

    public override void Render(IRenderContext rc)
    {
        var area = PlotModel.PlotArea;
        var left = area.Right + Gap;
        var y = area.Top;
        var ink = PlotModel.TextColor;
        var font = PlotModel.DefaultFont;

        rc.DrawText(new ScreenPoint(left, y), _caption, ink, font, _fontSize, FontWeights.Bold);
        y += RowHeight + _fontSize * 0.2;
        Rule(rc, left, y);
        y += _fontSize * 0.2;
        DrawRow(rc, _header, left, y, FontWeights.Bold);
        y += RowHeight;
        Rule(rc, left, y);
        y += _fontSize * 0.2;
        var fit = RowsThatFit(PlotModel.Height - PlotModel.Padding.Bottom - area.Top, _fontSize);
        var shown = _rows.Length <= fit ? _rows.Length : Math.Max(0, fit - 1);
        foreach (var row in _rows.Take(shown))
        {
            DrawRow(rc, row, left, y, FontWeights.Normal);
            y += RowHeight;
        }
        if (shown < _rows.Length)
        {
            DrawRow(rc, [More(_rows.Length - shown), .. Enumerable.Repeat("", _header.Length - 1)], left, y, FontWeights.Normal);
            y += RowHeight;
        }
        Rule(rc, left, y);
    }

    private static string More(int n) => $"… {n} more";

    private void DrawRow(IRenderContext rc, string[] cells, double left, double y, double weight)
    {
        var x = left;
        for (var c = 0; c < cells.Length; c++)
        {
            var anchor = _rightAligned[c] ? x + _columnWidths[c] : x;
            rc.DrawText(new ScreenPoint(anchor, y), cells[c], PlotModel.TextColor, PlotModel.DefaultFont, _fontSize, weight,
                0, _rightAligned[c] ? HorizontalAlignment.Right : HorizontalAlignment.Left);
            x += _columnWidths[c] + ColumnGap;
        }
    }

    private void Rule(IRenderContext rc, double left, double y) =>
        rc.DrawLine([new ScreenPoint(left, y), new ScreenPoint(left + Width, y)], FigurePalette.Ink, FigureStyle.AxisThickness,
            EdgeRenderingMode.Automatic);
}
