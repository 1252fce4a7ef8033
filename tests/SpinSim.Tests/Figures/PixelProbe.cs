using OxyPlot;
using OxyPlot.Axes;
using SkiaSharp;

namespace SpinSim.Tests.Figures;

/// <summary>
/// Reads a rendered PNG back and relates pixels to the model's layout. After rendering, OxyPlot has laid the
/// model out in units of 1/96 inch (PlotArea, axis ScreenMin/ScreenMax, Transform); the PNG has dpi/96 pixels
/// per unit, so a position in the model times that factor is a pixel.
/// </summary>
internal sealed class PixelProbe : IDisposable
{
    private readonly SKBitmap _bitmap;

    public PixelProbe(byte[] png, PlotModel model, double dpi)
    {
        _bitmap = SKBitmap.Decode(png) ?? throw new InvalidOperationException("the PNG could not be decoded");
        Model = model;
        Scale = dpi / 96.0;
    }

    public PlotModel Model { get; }
    public double Scale { get; }
    public int Width => _bitmap.Width;
    public int Height => _bitmap.Height;

    public void Dispose() => _bitmap.Dispose();

    public SKColor this[int x, int y] => _bitmap.GetPixel(x, y);

    public Axis Axis(string key) => Model.Axes.Single(a => a.Key == key);

    /// <summary>Pixel column of <paramref name="value"/> on a horizontal axis.</summary>
    public double Column(string axisKey, double value) => Axis(axisKey).Transform(value) * Scale;

    /// <summary>Pixel row of <paramref name="value"/> on a vertical axis.</summary>
    public double Row(string axisKey, double value) => Axis(axisKey).Transform(value) * Scale;

    /// <summary>The plot area in pixels.</summary>
    public SKRectI PlotArea => Pixels(Model.PlotArea);

    public SKRectI Pixels(OxyRect r) =>
        new((int)Math.Round(r.Left * Scale), (int)Math.Round(r.Top * Scale), (int)Math.Round(r.Right * Scale), (int)Math.Round(r.Bottom * Scale));

    /// <summary>The vertical extent of a vertical axis in pixels (top, bottom).</summary>
    public (int Top, int Bottom) Band(string axisKey)
    {
        var a = Axis(axisKey);
        var y0 = a.ScreenMin.Y * Scale;
        var y1 = a.ScreenMax.Y * Scale;
        return ((int)Math.Round(Math.Min(y0, y1)), (int)Math.Round(Math.Max(y0, y1)));
    }

    public int Count(SKRectI region, Func<SKColor, bool> match)
    {
        var n = 0;
        for (var y = Math.Max(0, region.Top); y < Math.Min(Height, region.Bottom); y++)
            for (var x = Math.Max(0, region.Left); x < Math.Min(Width, region.Right); x++)
                if (match(_bitmap.GetPixel(x, y))) n++;
        return n;
    }

    /// <summary>The highest matching pixel row in the region and the mean column of the matches on it.</summary>
    public (double Column, int Row)? Topmost(SKRectI region, Func<SKColor, bool> match)
    {
        for (var y = Math.Max(0, region.Top); y < Math.Min(Height, region.Bottom); y++)
        {
            var xs = new List<int>();
            for (var x = Math.Max(0, region.Left); x < Math.Min(Width, region.Right); x++)
                if (match(_bitmap.GetPixel(x, y))) xs.Add(x);
            if (xs.Count > 0) return (xs.Average(), y);
        }
        return null;
    }

    public static bool IsDark(SKColor c) => c.Alpha > 200 && c.Red < 90 && c.Green < 90 && c.Blue < 90;

    public static bool IsNotWhite(SKColor c) => c.Red < 235 || c.Green < 235 || c.Blue < 235;

    /// <summary>Close to <paramref name="target"/> (a line's core, not its anti-aliased fringe).</summary>
    public static Func<SKColor, bool> Near(OxyColor target, int tolerance = 60) => c =>
        Math.Abs(c.Red - target.R) + Math.Abs(c.Green - target.G) + Math.Abs(c.Blue - target.B) <= tolerance;
}
