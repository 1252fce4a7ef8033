using System.Diagnostics;
using System.Text;
using System.Xml.Linq;
using OxyPlot;
using SkiaSharp;
using SpinSim.Figures;
using SpinSim.Figures.Plots;
using SpinSim.Figures.Rendering;

namespace SpinSim.Tests.Figures;

public sealed class FigureRendererTests
{
    private static readonly FigureOptions Small = new() { WidthMm = 120, HeightMm = 80, Dpi = 150 };

    private static PlotModel Spectrum(FigureOptions options) =>
        SpectrumFigure.Simulated(FigureSamples.Trace(), FigureSamples.Sticks(), FigureSamples.Labels(), options);

    [Theory]
    [InlineData("out/figure.png", FigureFormat.Png)]
    [InlineData("figure.SVG", FigureFormat.Svg)]
    [InlineData("/tmp/a.b/figure.Pdf", FigureFormat.Pdf)]
    public void Format_follows_the_extension(string path, FigureFormat expected) =>
        Assert.Equal(expected, FigureRenderer.FromExtension(path));

    [Theory]
    [InlineData("figure.jpg", "'.jpg'")]
    [InlineData("figure", "no extension")]
    public void Unknown_extension_names_itself_and_the_allowed_ones(string path, string named)
    {
        var e = Assert.Throws<ArgumentException>(() => FigureRenderer.FromExtension(path));
        Assert.Contains(named, e.Message);
        Assert.Contains(".png, .svg, .pdf", e.Message);
    }

    [Fact]
    public void Size_in_millimetres_gives_pixels_at_the_dpi()
    {
        var size = new FigureOptions { WidthMm = 254, HeightMm = 127, Dpi = 300 }.Resolve();
        Assert.Equal(3000, size.WidthPx);
        Assert.Equal(1500, size.HeightPx);
        Assert.Equal(960, size.WidthUnits, 9);
    }

    [Fact]
    public void Size_in_pixels_is_kept_exactly()
    {
        var size = new FigureOptions { WidthPx = 801, HeightPx = 333, Dpi = 96 }.Resolve();
        Assert.Equal((801, 333), (size.WidthPx, size.HeightPx));
    }

    [Theory]
    [InlineData(100.0, null, null, null, "height in mm")]
    [InlineData(100.0, 50.0, 800, 600, "not both")]
    [InlineData(null, null, 800, null, "height in pixels")]
    public void Half_given_or_mixed_sizes_are_refused(double? wmm, double? hmm, int? wpx, int? hpx, string message)
    {
        var options = new FigureOptions { WidthMm = wmm, HeightMm = hmm, WidthPx = wpx, HeightPx = hpx };
        var e = Assert.Throws<ArgumentException>(() => options.Resolve());
        Assert.Contains(message, e.Message);
    }

    [Fact]
    public void Absurd_dpi_and_font_sizes_are_refused()
    {
        Assert.Throws<ArgumentException>(() => new FigureOptions { Dpi = 5 }.Resolve());
        Assert.Throws<ArgumentException>(() => new FigureOptions { FontSizePt = 200 }.Resolve());
        Assert.Throws<ArgumentException>(() => new FigureOptions { WidthMm = 2000, HeightMm = 2000, Dpi = 1200 }.Resolve());
    }

    [Fact]
    public void Png_has_the_requested_pixels_and_records_its_dpi()
    {
        var png = FigureRenderer.Render(Spectrum(Small), FigureFormat.Png, Small);

        using var bitmap = SKBitmap.Decode(png);
        var size = Small.Resolve();
        Assert.Equal((size.WidthPx, size.HeightPx), (bitmap.Width, bitmap.Height));
        Assert.Equal(SKColors.White, bitmap.GetPixel(0, 0)); // an opaque white page, not a transparent one
        var inked = 0;
        for (var y = 0; y < bitmap.Height; y++)
            for (var x = 0; x < bitmap.Width; x++)
                if (PixelProbe.IsNotWhite(bitmap.GetPixel(x, y))) inked++;
        Assert.True(inked > 2000, $"only {inked} non-white pixels: the figure is blank");

        // pHYs follows IHDR: 150 dpi is 5906 pixels per metre (PNG specification 11.3.5.3).
        Assert.Equal("pHYs", Encoding.ASCII.GetString(png, 37, 4));
        var ppm = (png[41] << 24) | (png[42] << 16) | (png[43] << 8) | png[44];
        Assert.Equal(5906, ppm);
    }

    [Fact]
    public void Svg_is_well_formed_xml_with_its_physical_size_and_text()
    {
        var svg = FigureRenderer.Render(Spectrum(Small), FigureFormat.Svg, Small);
        FigureSamples.Keep("spectrum.svg", svg);

        var doc = XDocument.Parse(Encoding.UTF8.GetString(svg));
        XNamespace ns = "http://www.w3.org/2000/svg";
        Assert.Equal(ns + "svg", doc.Root!.Name);
        Assert.Equal("120mm", (string?)doc.Root.Attribute("width"));
        Assert.Equal("80mm", (string?)doc.Root.Attribute("height"));
        Assert.NotNull(doc.Root.Attribute("viewBox"));
        var text = string.Concat(doc.Descendants(ns + "text").Select(t => t.Value));
        Assert.Contains("ppm", text);
        Assert.Contains("H1", text);
        // Every text names the bundled font, with the generic family as the fallback where DejaVu is absent.
        Assert.NotEmpty(doc.Descendants(ns + "text"));
        Assert.All(doc.Descendants(ns + "text"), t => Assert.Equal("DejaVu Sans, sans-serif", (string?)t.Attribute("font-family")));
    }

    [Fact]
    public void Pdf_starts_with_the_pdf_header()
    {
        var pdf = FigureRenderer.Render(Spectrum(Small), FigureFormat.Pdf, Small);
        Assert.Equal("%PDF-", Encoding.ASCII.GetString(pdf, 0, 5));
        Assert.Contains("%%EOF", Encoding.ASCII.GetString(pdf[^32..]));
    }

    [Fact]
    public void Pdf_embeds_the_font_cut_to_the_characters_drawn()
    {
        // The whole DejaVu Sans is about 0.75 MB and about 0.4 MB compressed in a PDF; a figure that draws a few dozen
        // characters needs a small part of it. Measured: 442 kB with the whole font, 68 kB with the subset.
        var pdf = FigureRenderer.Render(Spectrum(Small), FigureFormat.Pdf, Small);
        var fontBytes = typeof(FigureRenderer).Assembly.GetManifestResourceStream("SpinSim.Figures.Fonts.DejaVuSans.ttf")!.Length;
        Assert.True(pdf.Length < fontBytes / 4, $"the PDF is {pdf.Length} bytes against a {fontBytes}-byte font: the font was embedded whole");
    }

    [PdfToolFact]
    public void Pdf_opens_in_a_pdf_tool_and_is_not_blank()
    {
        var pdf = FigureRenderer.Render(Spectrum(Small), FigureFormat.Pdf, Small);
        FigureSamples.Keep("spectrum.pdf", pdf);
        var folder = Directory.CreateTempSubdirectory("spinsim-pdf-").FullName;
        try
        {
            var input = Path.Combine(folder, "figure.pdf");
            File.WriteAllBytes(input, pdf);
            var start = new ProcessStartInfo(PdfToolFactAttribute.PdfToPpm, ["-png", "-r", "72", "-singlefile", input, Path.Combine(folder, "page")])
            {
                RedirectStandardError = true,
            };
            using var process = Process.Start(start)!;
            var errors = process.StandardError.ReadToEnd();
            Assert.True(process.WaitForExit(60_000), "pdftoppm did not finish within a minute");
            Assert.True(process.ExitCode == 0, $"pdftoppm failed ({process.ExitCode}): {errors}");

            using var page = SKBitmap.Decode(Path.Combine(folder, "page.png"));
            // 120 x 80 mm at 72 dpi is 340 x 227 points: the page has the figure's physical size.
            Assert.InRange(page.Width, 338, 342);
            Assert.InRange(page.Height, 225, 229);
            var inked = 0;
            for (var y = 0; y < page.Height; y++)
                for (var x = 0; x < page.Width; x++)
                    if (PixelProbe.IsNotWhite(page.GetPixel(x, y))) inked++;
            Assert.True(inked > 500, $"only {inked} non-white pixels on the rasterised PDF page");
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    [Fact]
    public void Text_uses_the_bundled_font_whatever_family_the_model_names()
    {
        Assert.Equal(BundledFont.FamilyName, BundledFont.Typeface.FamilyName);

        var usual = Spectrum(Small);
        var odd = Spectrum(Small);
        odd.DefaultFont = "No Such Family On Any Machine";
        // Same pixels: the family name is never looked up in the system's fonts, which may not exist.
        Assert.Equal(FigureRenderer.Render(usual, FigureFormat.Png, Small), FigureRenderer.Render(odd, FigureFormat.Png, Small));
    }

    [Fact]
    public void Font_licence_ships_with_the_assembly()
    {
        var licence = BundledFont.LicenceText;
        Assert.Contains("Bitstream Vera", licence);
        Assert.Contains("DejaVu changes are in public domain", licence);
    }

    [Fact]
    public void Output_stream_is_left_open_for_the_caller()
    {
        using var stream = new MemoryStream();
        FigureRenderer.Render(Spectrum(Small), FigureFormat.Svg, Small, stream);
        FigureRenderer.Render(Spectrum(Small), FigureFormat.Pdf, Small, stream);
        Assert.True(stream.CanWrite);
    }
}
