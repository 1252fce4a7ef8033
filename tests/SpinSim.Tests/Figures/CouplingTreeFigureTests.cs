using SpinSim.Figures;
using SpinSim.Figures.Plots;

namespace SpinSim.Tests.Figures;

public sealed class CouplingTreeFigureTests
{
    private static readonly FigureOptions Options = new() { WidthMm = 140, HeightMm = 100, Dpi = 200 };

    [Fact]
    public void Doublet_of_triplets_has_lines_at_binomial_positions()
    {
        // dt, J = 10 Hz to one partner and 3 Hz to two: lines at ±5 ± {3, 0, -3} Hz, heights 1:2:1 twice.
        var model = CouplingTreeFigure.Create("H2", 1234.5, [("H1", 10.0, 1), ("H3", 3.0, 2)], Options);
        var png = FigureRenderer.Render(model, FigureFormat.Png, Options);
        FigureSamples.Keep("coupling-tree.png", png);
        using var probe = new PixelProbe(png, model, Options.Dpi);

        var sticks = model.Series.OfType<OxyPlot.Series.StemSeries>().Single();
        Assert.Equal([-8, -5, -2, 2, 5, 8], sticks.Points.Select(p => Math.Round(p.X, 9)));
        var heights = sticks.Points.Select(p => p.Y - sticks.Base).ToArray();
        Assert.Equal(heights[0] * 2, heights[1], 9);
        Assert.Equal(heights[0], heights[2], 9);

        var (top, bottom) = (probe.Row("tree", -0.3), probe.Row("tree", -1.6));
        foreach (var hz in new[] { -8.0, -5, -2, 2, 5, 8 })
        {
            var x = (int)Math.Round(probe.Column("hz", hz));
            var hits = probe.Count(new(x - 3, (int)top, x + 4, (int)bottom), PixelProbe.Near(FigurePalette.Vermillion, 90));
            Assert.True(hits > 20, $"no multiplet line at {hz} Hz");
        }
        // Higher frequency on the left, as on the ppm axis.
        Assert.True(probe.Column("hz", 8) < probe.Column("hz", -8));
    }

    [Fact]
    public void Equivalent_partners_give_binomial_weights()
    {
        var model = CouplingTreeFigure.Create("CH2", 0, [("CH3", 7.0, 3)], Options);
        var sticks = model.Series.OfType<OxyPlot.Series.StemSeries>().Single();
        var heights = sticks.Points.Select(p => p.Y - sticks.Base).ToArray();
        Assert.Equal(4, heights.Length);
        Assert.Equal(3.0, heights[1] / heights[0], 9);
        Assert.Equal(1.0, heights[3] / heights[0], 9);
    }

    [Theory]
    [InlineData("s")]
    [InlineData("d", 1)]
    [InlineData("t", 2)]
    [InlineData("dq", 1, 3)]
    [InlineData("sept", 6)]
    public void Pattern_names_follow_the_usual_letters(string expected, params int[] counts) =>
        Assert.Equal(expected, CouplingTreeFigure.PatternName(counts.Select(n => ("X", 7.0, n)).ToArray()));

    [Fact]
    public void A_tree_too_large_to_draw_is_refused()
    {
        var e = Assert.Throws<ArgumentException>(() => CouplingTreeFigure.Create("H", 0, Enumerable.Repeat(("X", 1.0, 3), 7).ToArray(), Options));
        Assert.Contains(CouplingTreeFigure.MaxLines.ToString(), e.Message);
    }

    [Fact]
    public void A_count_below_one_is_refused() =>
        Assert.Throws<ArgumentException>(() => CouplingTreeFigure.Create("H", 0, [("X", 7.0, 0)], Options));
}
