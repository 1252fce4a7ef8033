using SpinSim.Core.Traces;
using SpinSim.Figures;
using SpinSim.Figures.Plots;

namespace SpinSim.Tests.Figures;

public sealed class StackedFieldsFigureTests
{
    private static readonly FigureOptions Options = new() { WidthMm = 170, HeightMm = 120, Dpi = 200 };

    private static IReadOnlyList<(string, SpectrumTrace)> Fields() =>
        [("60 MHz", FigureSamples.Trace(60, widthPpm: 0.04)), ("400 MHz", FigureSamples.Trace(400)), ("900 MHz", FigureSamples.Trace(900, widthPpm: 0.004))];

    [Fact]
    public void Each_trace_peaks_at_the_same_column_in_its_own_band()
    {
        var model = StackedFieldsFigure.Create(Fields(), Options);
        var png = FigureRenderer.Render(model, FigureFormat.Png, Options);
        FigureSamples.Keep("stacked.png", png);
        using var probe = new PixelProbe(png, model, Options.Dpi);
        var area = probe.PlotArea;
        var expected = probe.Column("ppm", FigureSamples.TallestPpm);

        for (var i = 0; i < 3; i++)
        {
            var baseline = (2 - i) * 1.15;
            var top = (int)Math.Round(probe.Row("stack", baseline + 1.1));
            var bottom = (int)Math.Round(probe.Row("stack", baseline));
            var peak = probe.Topmost(new(area.Left + 3, top, area.Right - 3, bottom), PixelProbe.Near(FigurePalette.Sequence[i], 90));
            Assert.NotNull(peak);
            Assert.InRange(peak.Value.Column, expected - 4, expected + 4);
        }
    }

    [Fact]
    public void Labels_are_written_in_the_left_margin()
    {
        var model = StackedFieldsFigure.Create(Fields(), Options);
        var png = FigureRenderer.Render(model, FigureFormat.Png, Options);
        using var probe = new PixelProbe(png, model, Options.Dpi);
        var area = probe.PlotArea;
        for (var i = 0; i < 3; i++)
        {
            var y = (int)Math.Round(probe.Row("stack", (2 - i) * 1.15 + 0.15));
            var text = probe.Count(new(0, y - 15, area.Left - 2, y + 15), PixelProbe.IsDark);
            Assert.True(text > 100, $"no label beside trace {i} ({text} dark pixels)");
        }
    }

    [Fact]
    public void Traces_of_different_nuclei_are_refused()
    {
        var carbon = new SpectrumTrace([1, 2], [0, 1], 100, "13C", TraceOrigin.Describe("test"));
        var e = Assert.Throws<ArgumentException>(() => StackedFieldsFigure.Create([("400 MHz", FigureSamples.Trace()), ("100 MHz", carbon)], Options));
        Assert.Contains("13C", e.Message);
    }

    [Fact]
    public void No_traces_is_refused() =>
        Assert.Throws<ArgumentException>(() => StackedFieldsFigure.Create([], Options));
}
