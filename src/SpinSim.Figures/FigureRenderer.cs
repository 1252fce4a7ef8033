using System.Xml.Linq;
using OxyPlot;
using SkiaSharp;
using SpinSim.Figures.Rendering;

namespace SpinSim.Figures;

/// <summary>
/// Draws a plot model as PNG, SVG or PDF into a stream, headless, with the bundled font. The caller opens
/// and closes files; this class only writes bytes.
/// </summary>
public static class FigureRenderer
{
    private static readonly (string Extension, FigureFormat Format)[] Known =
        [(".png", FigureFormat.Png), (".svg", FigureFormat.Svg), (".pdf", FigureFormat.Pdf)];

    /// <summary>The extensions <see cref="FromExtension"/> accepts.</summary>
    public static IReadOnlyList<string> Extensions { get; } = Known.Select(k => k.Extension).ToArray();

    /// <summary>The format named by the extension of <paramref name="path"/>, compared case-insensitively.</summary>
    /// <exception cref="ArgumentException">No extension, or one that is not .png, .svg or .pdf.</exception>
    public static FigureFormat FromExtension(string path) =>
        TryFromExtension(path, out var format, out var problem) ? format : throw new ArgumentException(problem, nameof(path));

    /// <summary>The format named by the extension of <paramref name="path"/>, or false with the problem in words.</summary>
    public static bool TryFromExtension(string path, out FigureFormat format, out string problem)
    {
        ArgumentNullException.ThrowIfNull(path);
        var extension = Path.GetExtension(path);
        foreach (var (ext, known) in Known)
            if (string.Equals(ext, extension, StringComparison.OrdinalIgnoreCase))
            {
                (format, problem) = (known, "");
                return true;
            }
        var shown = extension.Length == 0 ? "no extension" : $"extension '{extension}'";
        (format, problem) = (default, $"cannot tell the figure format from {shown}; use one of {string.Join(", ", Extensions)}");
        return false;
    }

    /// <summary>
    /// Draws <paramref name="model"/> into <paramref name="output"/> at the size of <paramref name="options"/>.
    /// The model's background is painted first (our figures use white); text uses the bundled font whatever
    /// the model names. The stream is written but not closed.
    /// </summary>
    /// <exception cref="ArgumentException">Invalid options (see <see cref="FigureOptions.Resolve"/>).</exception>
    /// <exception cref="InvalidOperationException">OxyPlot could not update or draw the model (the cause is attached).</exception>
    public static void Render(PlotModel model, FigureFormat format, FigureOptions options, Stream output)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(options);
        ArgumentNullException.ThrowIfNull(output);
        var size = options.Resolve();

        // OxyPlot keeps update errors to draw them as text in the figure; a figure file must not hide one.
        ((IPlotModel)model).Update(true);
        if (model.GetLastPlotException() is { } updateError)
            throw new InvalidOperationException($"the figure could not be laid out: {updateError.Message}", updateError);

        switch (format)
        {
            case FigureFormat.Png: RenderPng(model, size, output); break;
            case FigureFormat.Svg: RenderSvg(model, size, output); break;
            case FigureFormat.Pdf: RenderPdf(model, size, options, output); break;
            default: throw new ArgumentOutOfRangeException(nameof(format), format, "unknown figure format");
        }
    }

    /// <summary>As <see cref="Render(PlotModel, FigureFormat, FigureOptions, Stream)"/>, returning the bytes.</summary>
    public static byte[] Render(PlotModel model, FigureFormat format, FigureOptions options)
    {
        using var buffer = new MemoryStream();
        Render(model, format, options, buffer);
        return buffer.ToArray();
    }

    private static void RenderPng(PlotModel model, FigureSize size, Stream output)
    {
        using var bitmap = new SKBitmap(size.WidthPx, size.HeightPx);
        using (var canvas = new SKCanvas(bitmap))
        {
            canvas.Clear(ToSk(model.Background));
            // Snapping lines to whole pixels keeps thin axis lines crisp in a bitmap.
            Draw(model, canvas, OxyPlot.SkiaSharp.RenderTarget.PixelGraphic, (float)(size.Dpi / FigureSize.UnitsPerInch),
                size.WidthPx / (size.Dpi / FigureSize.UnitsPerInch), size.HeightPx / (size.Dpi / FigureSize.UnitsPerInch));
        }
        using var image = SKImage.FromBitmap(bitmap);
        using var data = image.Encode(SKEncodedImageFormat.Png, 100);
        var png = PngDensity.WithDpi(data.ToArray(), size.Dpi);
        output.Write(png);
    }

    private static void RenderSvg(PlotModel model, FigureSize size, Stream output)
    {
        // SVG user units are CSS pixels, 1/96 inch: the same as OxyPlot's layout units, so no scaling.
        using var buffer = new MemoryStream();
        using (var canvas = SKSvgCanvas.Create(SKRect.Create((float)size.WidthUnits, (float)size.HeightUnits), buffer))
        {
            if (model.Background.IsVisible())
                using (var paint = new SKPaint { Color = ToSk(model.Background), Style = SKPaintStyle.Fill })
                    canvas.DrawRect(SKRect.Create((float)size.WidthUnits, (float)size.HeightUnits), paint);
            Draw(model, canvas, OxyPlot.SkiaSharp.RenderTarget.VectorGraphic, 1f, size.WidthUnits, size.HeightUnits);
        }
        buffer.Position = 0;
        var svg = XDocument.Load(buffer);
        StatePhysicalSize(svg, size);
        using var text = new StreamWriter(output, new System.Text.UTF8Encoding(false), leaveOpen: true);
        svg.Save(text, SaveOptions.DisableFormatting);
    }

    // Skia writes the size in bare user units, which tools read as pixels; millimetres plus a viewBox keep the
    // physical size and let a browser scale the drawing. The generic family is the fallback where DejaVu is absent.
    private static void StatePhysicalSize(XDocument svg, FigureSize size)
    {
        var root = svg.Root ?? throw new InvalidOperationException("the SVG writer produced no root element");
        var inv = System.Globalization.CultureInfo.InvariantCulture;
        root.SetAttributeValue("viewBox", string.Create(inv, $"0 0 {size.WidthUnits:0.###} {size.HeightUnits:0.###}"));
        root.SetAttributeValue("width", string.Create(inv, $"{size.WidthMm:0.###}mm"));
        root.SetAttributeValue("height", string.Create(inv, $"{size.HeightMm:0.###}mm"));
        foreach (var element in root.DescendantsAndSelf())
        {
            var family = element.Attribute("font-family");
            if (family is not null && !family.Value.Contains("sans-serif", StringComparison.Ordinal))
                family.Value = family.Value + ", sans-serif";
            if (element.Name.LocalName == "text") PortableText(element);
        }
    }

    // Skia writes each string between newlines and tabs with one x per glyph and a trailing comma ("x=\"-3.8, \"").
    // Renderers differ on both: some keep the whitespace as a leading space that takes the first x, some reject the
    // trailing comma. The string trimmed, and the lists cleaned (one x per character, else the first only), read the same
    // everywhere; the start stays where Skia put it.
    private static void PortableText(XElement text)
    {
        var content = text.Value.Trim();
        text.RemoveNodes();
        text.Add(new XText(content));
        var characters = System.Globalization.StringInfo.ParseCombiningCharacters(content).Length;
        foreach (var name in new[] { "x", "y" })
        {
            var attribute = text.Attribute(name);
            if (attribute is null) continue;
            var values = attribute.Value.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
            attribute.Value = values.Length == characters && name == "x" ? string.Join(" ", values) : values.FirstOrDefault() ?? "0";
        }
    }

    private static void RenderPdf(PlotModel model, FigureSize size, FigureOptions options, Stream output)
    {
        const float pointsPerInch = 72;
        var metadata = new SKDocumentPdfMetadata
        {
            Title = string.IsNullOrEmpty(model.Title) ? (options.Title ?? "") : model.Title,
            Creator = "SpinSim",
            Producer = "SpinSim (SkiaSharp)",
            RasterDpi = (float)options.Dpi,
            EncodingQuality = 101, // lossless for anything Skia has to rasterise
            PdfA = false,
        };
        // A first pass collects the characters drawn, so that the PDF embeds the font cut to them (FontSubset).
        var used = new HashSet<int>();
        using (var bitmap = new SKBitmap(1, 1))
        using (var scratch = new SKCanvas(bitmap))
            Draw(model, scratch, OxyPlot.SkiaSharp.RenderTarget.VectorGraphic, 1f, size.WidthUnits, size.HeightUnits, codepoints: used);
        using var subset = FontSubset.Create(BundledFont.FontBytes(), used);
        using var skStream = new SKManagedWStream(output);
        using var document = SKDocument.CreatePdf(skStream, metadata);
        var canvas = document.BeginPage((float)(size.WidthInches * pointsPerInch), (float)(size.HeightInches * pointsPerInch));
        if (model.Background.IsVisible()) canvas.Clear(ToSk(model.Background));
        // PDF draws in points (1/72 inch); OxyPlot lays out in 1/96 inch.
        Draw(model, canvas, OxyPlot.SkiaSharp.RenderTarget.VectorGraphic, pointsPerInch / (float)FigureSize.UnitsPerInch,
            size.WidthUnits, size.HeightUnits, subset);
        document.EndPage();
        document.Close();
    }

    private static void Draw(PlotModel model, SKCanvas canvas, OxyPlot.SkiaSharp.RenderTarget target, float dpiScale,
        double widthUnits, double heightUnits, SKTypeface? typeface = null, HashSet<int>? codepoints = null)
    {
        using var context = new BundledFontRenderContext
        {
            RenderTarget = target, SkCanvas = canvas, DpiScale = dpiScale, UseTextShaping = false, Typeface = typeface, Codepoints = codepoints,
        };
        ((IPlotModel)model).Render(context, new OxyRect(0, 0, widthUnits, heightUnits));
        if (context.Failure is { } failure)
            throw new InvalidOperationException($"the figure could not be drawn: {failure}");
    }

    private static SKColor ToSk(OxyColor c) => c.IsVisible() ? new SKColor(c.R, c.G, c.B, c.A) : SKColors.Transparent;
}
