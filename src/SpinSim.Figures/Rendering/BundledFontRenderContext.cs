using OxyPlot;
using OxyPlot.SkiaSharp;
using SkiaSharp;

namespace SpinSim.Figures.Rendering;

/// <summary>
/// The SkiaSharp render context of OxyPlot with its text drawing replaced. OxyPlot.SkiaSharp 2.2.0 looks
/// fonts up by family name through the platform font manager in a private method; on a machine without
/// fonts that lookup fails and export throws. This class re-implements <see cref="IRenderContext"/>'s two
/// text members (interface re-implementation: the base members are sealed) so that every string is
/// measured and drawn with <see cref="BundledFont"/>, whatever family the model asks for. Shapes are
/// still drawn by the base class.
/// </summary>
internal sealed class BundledFontRenderContext : SkiaRenderContext, IRenderContext
{
    // The prefix of the message PlotModel draws instead of the plot when rendering throws.
    private const string OxyPlotFailurePrefix = "OxyPlot exception";

    /// <summary>The message OxyPlot drew in place of the plot when its rendering failed, else null.</summary>
    public string? Failure { get; private set; }

    /// <summary>Draw text with this typeface (a subset of the bundled font) instead of the whole font.</summary>
    public SKTypeface? Typeface { get; init; }

    /// <summary>When set, every character drawn is added here (the first pass of a PDF, to cut the font to it).</summary>
    public HashSet<int>? Codepoints { get; init; }

    public new void DrawText(ScreenPoint p, string text, OxyColor fill, string? fontFamily = null, double fontSize = 10,
        double fontWeight = 400, double rotation = 0, HorizontalAlignment horizontalAlignment = HorizontalAlignment.Left,
        VerticalAlignment verticalAlignment = VerticalAlignment.Top, OxySize? maxSize = null)
    {
        if (text is null || !fill.IsVisible()) return;
        if (text.StartsWith(OxyPlotFailurePrefix, StringComparison.Ordinal)) Failure ??= text;
        if (Codepoints is not null)
            for (var i = 0; i < text.Length; i += char.IsSurrogatePair(text, i) ? 2 : 1) Codepoints.Add(char.ConvertToUtf32(text, i));

        using var paint = BundledFont.CreatePaint(fontSize * DpiScale, fontWeight >= FontWeights.Bold, Typeface);
        paint.Color = new SKColor(fill.R, fill.G, fill.B, fill.A);
        var lines = SplitLines(text);
        var lineHeight = paint.GetFontMetrics(out var metrics);

        // Baseline of the first line relative to the anchor point (Skia's ascent is negative).
        var y = verticalAlignment switch
        {
            VerticalAlignment.Top => -metrics.Ascent,
            VerticalAlignment.Middle => -(metrics.Ascent + metrics.Descent + lineHeight * (lines.Length - 1)) / 2,
            _ => -metrics.Descent - lineHeight * (lines.Length - 1),
        };

        SkCanvas.Save();
        SkCanvas.Translate((float)(p.X * DpiScale), (float)(p.Y * DpiScale));
        if (rotation != 0) SkCanvas.RotateDegrees((float)rotation);
        foreach (var line in lines)
        {
            var width = paint.MeasureText(line);
            var x = horizontalAlignment switch
            {
                HorizontalAlignment.Left => 0f,
                HorizontalAlignment.Center => -width / 2,
                _ => -width,
            };
            SkCanvas.DrawText(line, x, y, paint);
            y += lineHeight;
        }
        SkCanvas.Restore();
    }

    public new OxySize MeasureText(string text, string? fontFamily = null, double fontSize = 10, double fontWeight = 500)
    {
        if (text is null) return new OxySize(0, 0);
        // Measured at the output scale, as drawn, then returned in OxyPlot's device-independent units (1/96 inch).
        using var paint = BundledFont.CreatePaint(fontSize * DpiScale, fontWeight >= FontWeights.Bold, Typeface);
        var lines = SplitLines(text);
        var width = lines.Max(l => paint.MeasureText(l));
        return new OxySize(width / DpiScale, paint.FontSpacing * lines.Length / DpiScale);
    }

    private static string[] SplitLines(string text) => text.Replace("\r\n", "\n").Split('\n');
}
