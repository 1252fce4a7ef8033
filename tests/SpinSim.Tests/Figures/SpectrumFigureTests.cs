using SpinSim.Figures;
using SpinSim.Figures.Plots;

namespace SpinSim.Tests.Figures;

public sealed class SpectrumFigureTests
{
    private static readonly FigureOptions Options = new() { WidthMm = 170, HeightMm = 100, Dpi = 200 };

    private static (byte[] Png, PixelProbe Probe) Draw(IReadOnlyList<StickLine>? sticks, IReadOnlyList<ShiftLabel>? labels, string name)
    {
        var model = SpectrumFigure.Simulated(FigureSamples.Trace(), sticks, labels, Options);
        var png = FigureRenderer.Render(model, FigureFormat.Png, Options);
        FigureSamples.Keep(name, png);
        return (png, new PixelProbe(png, model, Options.Dpi));
    }

    [Fact]
    public void Tallest_peak_is_drawn_where_its_shift_falls_on_the_reversed_axis()
    {
        var (_, probe) = Draw(FigureSamples.Sticks(), FigureSamples.Labels(), "spectrum.png");
        using var _ = probe;
        var area = probe.PlotArea;
        var (top, bottom) = probe.Band("trace");

        var peak = probe.Topmost(new(area.Left + 3, top, area.Right - 3, bottom), PixelProbe.Near(FigurePalette.Simulated));

        Assert.NotNull(peak);
        var expected = probe.Column("ppm", FigureSamples.TallestPpm);
        Assert.InRange(peak.Value.Column, expected - 4, expected + 4);
        // Reversed: 7.26 ppm of 0..10 lies in the left third of the plot, not the right.
        Assert.True(peak.Value.Column < area.Left + 0.35 * area.Width, $"peak at column {peak.Value.Column}, plot from {area.Left} to {area.Right}");
    }

    [Fact]
    public void Sticks_are_drawn_in_the_lower_panel_at_their_shifts()
    {
        var (_, probe) = Draw(FigureSamples.Sticks(), null, "spectrum-sticks.png");
        using var _ = probe;
        var (top, bottom) = probe.Band("sticks");
        foreach (var (ppm, _) in FigureSamples.Peaks)
        {
            var x = (int)Math.Round(probe.Column("ppm", ppm));
            var hits = probe.Count(new(x - 3, top, x + 4, bottom), PixelProbe.Near(FigurePalette.Sticks, 90));
            Assert.True(hits > 10, $"no stick drawn at {ppm} ppm (column {x})");
        }
    }

    [Fact]
    public void Without_sticks_there_is_no_stick_panel()
    {
        var model = SpectrumFigure.Simulated(FigureSamples.Trace(), null, null, Options);
        Assert.DoesNotContain(model.Axes, a => a.Key == "sticks");
        Assert.Equal(0, model.Axes.Single(a => a.Key == "trace").StartPosition);
    }

    [Fact]
    public void Axis_title_and_tick_labels_are_drawn_under_the_plot()
    {
        var (_, probe) = Draw(null, null, "spectrum-plain.png");
        using var _ = probe;
        var area = probe.PlotArea;
        var text = probe.Count(new(area.Left, area.Bottom + 3, area.Right, probe.Height), PixelProbe.IsDark);
        Assert.True(text > 800, $"only {text} dark pixels in the axis label area");
    }

    [Fact]
    public void Labels_are_drawn_above_their_peaks()
    {
        var (_, probe) = Draw(null, FigureSamples.Labels(), "spectrum-labels.png");
        using var _ = probe;
        var (top, _) = probe.Band("trace");
        var x = (int)Math.Round(probe.Column("ppm", 3.50));
        var peakRow = (int)Math.Round(probe.Row("trace", 0.6));
        var text = probe.Count(new(x - 30, top, x + 30, peakRow - 2), PixelProbe.IsDark);
        Assert.True(text > 50, $"no label text above the peak at 3.50 ppm ({text} dark pixels)");
    }

    [Fact]
    public void Labels_of_close_shifts_go_to_separate_rows()
    {
        var model = SpectrumFigure.Simulated(FigureSamples.Trace(), null, FigureSamples.Labels(), Options);
        var a = model.Annotations.OfType<OxyPlot.Annotations.TextAnnotation>().Single(t => t.Text == "CH3 (a)");
        var b = model.Annotations.OfType<OxyPlot.Annotations.TextAnnotation>().Single(t => t.Text == "CH3 (b)");
        Assert.NotEqual(a.Offset.Y, b.Offset.Y);
    }

    [Fact]
    public void Non_finite_sticks_are_refused()
    {
        var e = Assert.Throws<ArgumentException>(() =>
            SpectrumFigure.Simulated(FigureSamples.Trace(), [new StickLine(double.NaN, 1)], null, Options));
        Assert.Contains("finite", e.Message);
    }

    [Fact]
    public void Nucleus_mass_number_is_written_as_a_superscript() =>
        Assert.Equal("δ(¹H) / ppm", SpectrumFigure.Simulated(FigureSamples.Trace(), null, null, Options).Axes[0].Title);

    [Fact]
    public void A_vertical_expansion_redraws_its_range_scaled_and_says_by_how_much()
    {
        var trace = FigureSamples.Trace();
        var tallest = trace.Intensity.Max();
        // A range of Lorentzian tails only (no peak between 5 and 4 ppm): small values, so a large factor.
        var model = SpectrumFigure.Simulated(trace, null, null, Options, [new VerticalExpansion(5.0, 4.0), new VerticalExpansion(3.6, 3.4, Factor: 8)]);
        FigureSamples.Keep("spectrum-expansion.png", FigureRenderer.Render(model, FigureFormat.Png, Options));
        var labels = model.Annotations.OfType<OxyPlot.Annotations.TextAnnotation>().Select(a => a.Text).ToArray();
        Assert.Contains("×8", labels);

        // Auto factor: 1, 2 or 5 times a power of ten, rounded down from the one that lifts the range's top to 55 % of
        // the tallest point, so the scaled top lies between 55 % / 2.5 and 55 % of it (exact property of that rounding).
        var inside = Enumerable.Range(0, trace.Count).Where(i => trace.ShiftPpm[i] is >= 4.0 and <= 5.0).Select(i => trace.Intensity[i]).Max();
        var auto = labels.Single(t => t.StartsWith('×') && t != "×8");
        var factor = double.Parse(auto[1..], System.Globalization.CultureInfo.InvariantCulture);
        Assert.InRange(inside * factor, 0.55 * tallest / 2.5 - 1e-12, 0.55 * tallest + 1e-12);
        Assert.Contains(Math.Round(factor / Math.Pow(10, Math.Floor(Math.Log10(factor)))), new[] { 1.0, 2.0, 5.0 });
    }
}
