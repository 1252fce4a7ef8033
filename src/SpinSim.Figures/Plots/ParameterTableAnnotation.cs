using OxyPlot;
using OxyPlot.Annotations;
using SpinSim.Core.Reporting;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures.Plots;

/// <summary>
/// The fitted parameters as a ruled table under the plot, flowed into side-by-side blocks so that a column-width figure
/// stays short. Every row is drawn: <see cref="Layout"/> says whether all rows fit a given box, and the figure leaves the
/// table out (and says so) rather than cut it. OxyPlot has no table element; the cells are text in layout units, measured
/// with the same bundled font the figure is drawn with.
/// </summary>
internal sealed class ParameterTableAnnotation : Annotation
{
    private readonly string[][] _rows;
    private readonly string[] _header;
    private readonly bool[] _rightAligned;
    private readonly double _font;
    private readonly int _blocks;
    private readonly double[] _columnWidths;
    private readonly string _note;
    private readonly double _maxWidth;

    private ParameterTableAnnotation(string[] header, string[][] rows, bool[] rightAligned, double font, int blocks, string note, double maxWidth)
    {
        _maxWidth = maxWidth;
        _header = header;
        _rows = rows;
        _rightAligned = rightAligned;
        _font = font;
        _blocks = blocks;
        _note = note;
        _columnWidths = Enumerable.Range(0, header.Length)
            .Select(c => rows.Select(r => r[c]).Append(header[c]).Max(t => BundledFont.MeasureWidth(t, font))).ToArray();
        Layer = AnnotationLayer.AboveSeries;
    }

    /// <summary>Height of the table in layout units, note line included.</summary>
    public double Height => (RowsPerBlock + 1) * RowHeight + _font * 0.8 + NoteLines.Count * RowHeight;

    private IReadOnlyList<string> NoteLines => _note.Length == 0 ? [] : BundledFont.Wrap(_note, _font * 0.9, Math.Max(_maxWidth, BlockWidth));

    /// <summary>Width of the table in layout units.</summary>
    public double Width => Math.Max(_blocks * BlockWidth + (_blocks - 1) * BlockGap, NoteLines.Count == 0 ? 0 : NoteLines.Max(l => BundledFont.MeasureWidth(l, _font * 0.9)));

    /// <summary>Rows drawn (all of them, always).</summary>
    public int RowCount => _rows.Length;

    private int RowsPerBlock => (_rows.Length + _blocks - 1) / _blocks;
    private double RowHeight => BundledFont.LineHeight(_font) * 1.05;
    private double ColumnGap => _font * 0.7;
    private double BlockGap => _font * 2;
    private double BlockWidth => _columnWidths.Sum() + ColumnGap * (_columnWidths.Length - 1);

    /// <summary>
    /// The largest-font, fewest-block table of <paramref name="rows"/> that fits <paramref name="width"/> x
    /// <paramref name="height"/>, with text from <paramref name="font"/> down to <paramref name="smallestScale"/> of it;
    /// null when none fits.
    /// </summary>
    public static ParameterTableAnnotation? Layout(IReadOnlyList<ParameterRow> rows, string note, double font, double smallestScale,
        double width, double height)
    {
        var bootstrap = rows.Any(r => r.Bootstrap.Length > 0);
        var signs = rows.Any(r => r.Sign.Length > 0);
        string[] header = ["parameter", "value", .. bootstrap ? new[] { "bootstrap" } : [], .. signs ? new[] { "relative sign" } : []];
        var cells = rows.Select(r => new[] { r.Label, r.Value }.Concat(bootstrap ? [r.Bootstrap] : []).Concat(signs ? [r.Sign] : []).ToArray()).ToArray();
        bool[] right = [false, true, .. bootstrap ? new[] { true } : [], .. signs ? new[] { false } : []];
        // At each text size, the most side-by-side blocks that fit the width (the shortest table), at most two rows deep
        // per block unless the rows are few; the first size whose table fits the height wins.
        for (var scale = 1.0; scale >= smallestScale - 1e-9; scale -= 0.05)
        {
            ParameterTableAnnotation? best = null;
            for (var blocks = 1; blocks <= Math.Max(1, (rows.Count + 1) / 2); blocks++)
            {
                var table = new ParameterTableAnnotation(header, cells, right, font * scale, blocks, note, width);
                if (table.Width > width) break; // more blocks only get wider
                best = table;
            }
            if (best is not null && best.Height <= height) return best;
        }
        return null;
    }

    // The table lives in the margin under the plot; OxyPlot would clip an annotation to the plot area.
    public override OxyRect GetClippingRect() => new(0, 0, PlotModel.Width, PlotModel.Height);

    /// <summary>Top-left corner, set by the figure once the plot area is known.</summary>
    public Func<PlotModel, ScreenPoint> Origin { get; set; } = m => new ScreenPoint(m.PlotArea.Left, m.PlotArea.Bottom);

    public override void Render(IRenderContext rc)
    {
        var origin = Origin(PlotModel);
        var perBlock = RowsPerBlock;
        for (var b = 0; b < _blocks; b++)
        {
            var left = origin.X + b * (BlockWidth + BlockGap);
            var y = origin.Y;
            Rule(rc, left, y);
            y += _font * 0.2;
            DrawRow(rc, _header, left, y, FontWeights.Bold);
            y += RowHeight;
            Rule(rc, left, y);
            y += _font * 0.2;
            foreach (var row in _rows.Skip(b * perBlock).Take(perBlock))
            {
                DrawRow(rc, row, left, y, FontWeights.Normal);
                y += RowHeight;
            }
            Rule(rc, left, origin.Y + _font * 0.4 + (perBlock + 1) * RowHeight);
        }
        var noteY = origin.Y + _font * 0.8 + (perBlock + 1) * RowHeight;
        foreach (var line in NoteLines)
        {
            rc.DrawText(new ScreenPoint(origin.X, noteY), line, PlotModel.TextColor, PlotModel.DefaultFont, _font * 0.9, FontWeights.Normal);
            noteY += RowHeight;
        }
    }

    private void DrawRow(IRenderContext rc, string[] cells, double left, double y, double weight)
    {
        var x = left;
        for (var c = 0; c < cells.Length; c++)
        {
            var anchor = _rightAligned[c] ? x + _columnWidths[c] : x;
            rc.DrawText(new ScreenPoint(anchor, y), cells[c], PlotModel.TextColor, PlotModel.DefaultFont, _font, weight,
                0, _rightAligned[c] ? HorizontalAlignment.Right : HorizontalAlignment.Left);
            x += _columnWidths[c] + ColumnGap;
        }
    }

    private void Rule(IRenderContext rc, double left, double y) =>
        rc.DrawLine([new ScreenPoint(left, y), new ScreenPoint(left + BlockWidth, y)], FigurePalette.Ink, FigureStyle.AxisThickness,
            EdgeRenderingMode.Automatic);
}
