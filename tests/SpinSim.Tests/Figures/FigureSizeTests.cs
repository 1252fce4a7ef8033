using System.Globalization;
using System.Text;
using System.Xml.Linq;
using OxyPlot;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Reporting;
using SpinSim.Core.Traces;
using SpinSim.Figures;
using SpinSim.Figures.Plots;
using SpinSim.Figures.Rendering;

namespace SpinSim.Tests.Figures;

/// <summary>
/// Every figure kind at a journal column (85 x 70 mm), a wider column (120 x 90 mm) and a page width (250 x 150 mm):
/// the plot keeps at least half the width, no text runs off the canvas, and a parameter table is either whole or absent.
/// Measured from the SVG that is written (text positions and the bundled font's advance widths), so it checks the file
/// a reader gets. Sizes: common journal column widths (common practice, no source).
/// </summary>
public sealed class FigureSizeTests
{
    public static TheoryData<string, double, double> Cases()
    {
        var data = new TheoryData<string, double, double>();
        foreach (var kind in new[] { "spectrum", "fit", "fit-regions", "fit-joint", "fit-long", "fields", "tree" })
            foreach (var (w, h) in new[] { (85.0, 70.0), (120.0, 90.0), (250.0, 150.0) })
                data.Add(kind, w, h);
        return data;
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Figure_fits_its_canvas_and_keeps_its_plot(string kind, double widthMm, double heightMm)
    {
        var options = new FigureOptions { WidthMm = widthMm, HeightMm = heightMm, Dpi = 150 };
        var (model, rows, layout) = Build(kind, options);
        var svgBytes = FigureRenderer.Render(model, FigureFormat.Svg, options);
        FigureSamples.Keep($"size-{kind}-{widthMm:0}x{heightMm:0}.png", FigureRenderer.Render(model, FigureFormat.Png, options));
        var size = options.Resolve();

        Assert.True(model.PlotArea.Width >= 0.5 * size.WidthUnits,
            $"{kind} at {widthMm} x {heightMm} mm: the plot area is {model.PlotArea.Width / size.WidthUnits:P0} of the width");

        var svg = XDocument.Parse(Encoding.UTF8.GetString(svgBytes));
        var texts = svg.Descendants().Where(e => e.Name.LocalName == "text").ToList();
        Assert.NotEmpty(texts);
        foreach (var text in texts)
        {
            var (left, right, top, bottom) = Bounds(text);
            var content = text.Value;
            Assert.True(left >= -0.5 && right <= size.WidthUnits + 0.5 && top >= -0.5 && bottom <= size.HeightUnits + 0.5,
                $"{kind} at {widthMm} x {heightMm} mm: \"{content}\" spans x {left:0.0}..{right:0.0}, y {top:0.0}..{bottom:0.0} " +
                $"on a {size.WidthUnits:0.0} x {size.HeightUnits:0.0} canvas");
        }

        if (rows.Count > 0)
        {
            var drawn = texts.Select(t => t.Value).ToHashSet();
            var present = rows.Count(r => drawn.Contains(r.Label));
            Assert.True(present == rows.Count || present == 0,
                $"{kind} at {widthMm} x {heightMm} mm: {present} of {rows.Count} table rows drawn; all or none");
            Assert.Equal(present == rows.Count, layout!.TableShown);
            if (present == 0) Assert.Contains(texts, t => t.Value.Contains("left out"));
        }
    }

    // Canvas box of one SVG text element: Skia writes translate(tx ty) with x (per glyph) and y offsets, no rotation here.
    private static (double Left, double Right, double Top, double Bottom) Bounds(XElement text)
    {
        var transform = (string?)text.Attribute("transform") ?? "";
        Assert.DoesNotContain("rotate", transform);
        var numbers = transform.Replace("translate(", "").Replace(")", "").Split([' ', ','], StringSplitOptions.RemoveEmptyEntries)
            .Select(v => double.Parse(v, CultureInfo.InvariantCulture)).ToArray();
        var (tx, ty) = numbers.Length >= 2 ? (numbers[0], numbers[1]) : (0.0, 0.0);
        double First(string name) => double.Parse(((string?)text.Attribute(name) ?? "0").Split(' ')[0], CultureInfo.InvariantCulture);
        var fontSize = double.Parse((string?)text.Attribute("font-size") ?? "12", CultureInfo.InvariantCulture);
        var left = tx + First("x");
        var baseline = ty + First("y");
        return (left, left + BundledFont.MeasureWidth(text.Value, fontSize), baseline - 0.93 * fontSize, baseline + 0.24 * fontSize);
    }

    private static (PlotModel Model, IReadOnlyList<ParameterRow> Rows, FitFigureLayout? Layout) Build(string kind, FigureOptions options)
    {
        switch (kind)
        {
            case "spectrum":
                // Labels at the very edges of the trace must be moved inside.
                IReadOnlyList<ShiftLabel> labels = [.. FigureSamples.Labels(), new("HA/HA′ (edge)", 9.999), new("H-far-right", 0.0)];
                return (SpectrumFigure.Simulated(FigureSamples.Trace(), FigureSamples.Sticks(), labels, options), [], null);
            case "fields":
                return (StackedFieldsFigure.Create([("400 MHz", FigureSamples.Trace(400)), ("80 MHz", FigureSamples.Trace(80)), ("60 MHz", FigureSamples.Trace(60))], options), [], null);
            case "tree":
                return (CouplingTreeFigure.Create("HA'", 1103.5, [("HB'", -16.4, 1), ("HX", 4.7, 1), ("CH3", 7.0, 3)], options,
                    "First order does not hold (|Δν/J| = 0.8 to HB′; below 10): the real pattern differs, simulate it."), [], null);
        }
        var rows = Rows(kind == "fit-long" ? 14 : 7);
        var data = FigureSamples.Fit() with { Parameters = rows };
        if (kind == "fit-regions")
            data = data with { Regions = [new PpmRange(7.6, 6.9), new PpmRange(3.7, 3.3), new PpmRange(1.5, 0.9)], Excluded = [new PpmRange(7.28, 7.24)] };
        if (kind == "fit-joint")
        {
            var second = FigureSamples.Fit().Traces[0] with { Label = "80 MHz" };
            data = data with { Traces = [data.Traces[0] with { Label = "400 MHz" }, second], Regions = [new PpmRange(7.6, 6.9), new PpmRange(1.5, 0.9)] };
        }
        var (model, layout) = FitFigure.Build(data, options);
        return (model, rows.Where(r => r.Group != ParameterGroup.Nuisance).ToArray(), layout);
    }

    // Rows as a fit gives them (labels and concise values), nuisance rows included: the figure names those in a note.
    private static IReadOnlyList<ParameterRow> Rows(int spin) =>
    [
        .. Enumerable.Range(0, spin).Select(i => new ParameterRow(i % 2 == 0 ? $"δ(H{i})/ppm" : $"J(H{i},H{i + 1})/Hz",
            i % 2 == 0 ? "7.352006(33)" : "\u221216.0989(20)", "", ParameterGroup.Spin)),
        // Primes and a long tied label widen the label column, as a real AA′BB′ fit does.
        new("J(HA′,HB′)/Hz (= J(HA,HB))", "8.4499(4)", "", ParameterGroup.Spin),
        new("width/Hz", "0.6496(8)", "", ParameterGroup.Width),
        new("scale", "0.9996(8)", "", ParameterGroup.Nuisance),
        new("phase/°", "\u22122.00(5)", "", ParameterGroup.Nuisance),
    ];
}
