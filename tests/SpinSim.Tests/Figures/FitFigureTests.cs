using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Reporting;
using SpinSim.Figures;
using SpinSim.Figures.Plots;

namespace SpinSim.Tests.Figures;

public sealed class FitFigureTests
{
    private static readonly FigureOptions Options = new() { WidthMm = 170, HeightMm = 110, Dpi = 200 };

    private static PixelProbe Draw(FitFigureData data, string name, FigureOptions? options = null)
    {
        options ??= Options;
        var model = FitFigure.Create(data, options);
        var png = FigureRenderer.Render(model, FigureFormat.Png, options);
        FigureSamples.Keep(name, png);
        return new PixelProbe(png, model, options.Dpi);
    }

    [Fact]
    public void The_table_has_a_relative_sign_column_only_when_a_row_has_a_verdict()
    {
        // Issue 18: the figure's table says for each coupling whether its relative sign is determined.
        var plain = FigureSamples.Fit();
        var withSigns = plain with { Parameters = [.. plain.Parameters, new ParameterRow("J(H1,H2)/Hz", "7.52(2)", "", ParameterGroup.Spin, "determined")] };
        string Svg(FitFigureData d) => System.Text.Encoding.UTF8.GetString(FigureRenderer.Render(FitFigure.Create(d, Options), FigureFormat.Svg, Options));
        Assert.DoesNotContain("relative sign", Svg(plain));
        var svg = Svg(withSigns);
        Assert.Contains("relative sign", svg);
        Assert.Contains(">determined<", svg);
    }

    [Fact]
    public void Measured_and_fitted_peaks_are_drawn_at_the_shift_of_the_tallest_peak()
    {
        using var probe = Draw(FigureSamples.Fit(), "fit.png");
        var area = probe.PlotArea;
        var (top, bottom) = probe.Band(FitFigure.MainAxis(0));
        var region = new SkiaSharp.SKRectI(area.Left + 4, top, area.Right - 4, bottom);
        var expected = probe.Column("ppm", FigureSamples.TallestPpm);

        var measured = probe.Topmost(region, PixelProbe.IsDark);
        var fitted = probe.Topmost(region, PixelProbe.Near(FigurePalette.Fitted, 90));

        Assert.NotNull(measured);
        Assert.NotNull(fitted);
        Assert.InRange(measured.Value.Column, expected - 4, expected + 4);
        Assert.InRange(fitted.Value.Column, expected - 4, expected + 4);
    }

    [Fact]
    public void Residual_panel_lies_below_the_spectra_and_is_drawn()
    {
        using var probe = Draw(FigureSamples.Fit(), "fit-residual.png");
        var (mainTop, mainBottom) = probe.Band(FitFigure.MainAxis(0));
        var (residualTop, residualBottom) = probe.Band(FitFigure.ResidualAxis(0));
        Assert.True(residualTop > mainBottom, "the residual panel must sit below the spectra");

        var area = probe.PlotArea;
        var drawn = probe.Count(new(area.Left + 4, residualTop, area.Right - 4, residualBottom), PixelProbe.Near(FigurePalette.Residual, 90));
        Assert.True(drawn > 500, $"only {drawn} residual pixels in the lower panel");
    }

    [Fact]
    public void Parameter_table_is_drawn_under_the_plot()
    {
        using var probe = Draw(FigureSamples.Fit(), "fit-table.png");
        var area = probe.PlotArea;
        var axisBottom = area.Bottom + (int)(FitFigure.AxisSpace(FigureStyleFont) * probe.Scale);
        var text = probe.Count(new(area.Left, axisBottom, area.Right, probe.Height), PixelProbe.IsDark);
        Assert.True(text > 1000, $"only {text} dark pixels where the table should be");
    }

    private static double FigureStyleFont => Options.FontSizePt * 96 / 72;

    [Fact]
    public void Text_is_drawn_in_the_axis_label_areas()
    {
        using var probe = Draw(FigureSamples.Fit(), "fit-axes.png");
        var area = probe.PlotArea;
        Assert.True(probe.Count(new(area.Left, area.Bottom + 3, area.Right, probe.Height), PixelProbe.IsDark) > 800);
        // No intensity axis (arbitrary units): the residual band is named inside the plot instead.
        var (residualTop, residualBottom) = probe.Band(FitFigure.ResidualAxis(0));
        Assert.True(probe.Count(new(area.Left, residualTop, area.Left + area.Width / 8, residualBottom), PixelProbe.IsDark) > 100);
    }

    [Fact]
    public void A_parameter_list_too_long_for_the_figure_is_left_out_whole_and_the_figure_says_so()
    {
        var options = new FigureOptions { WidthMm = 170, HeightMm = 80, Dpi = 200 };
        var (model, layout) = FitFigure.Build(FigureSamples.Fit(parameters: 80), options);
        FigureSamples.Keep("fit-many-parameters.png", FigureRenderer.Render(model, FigureFormat.Png, options));
        var svg = System.Text.Encoding.UTF8.GetString(FigureRenderer.Render(model, FigureFormat.Svg, options));
        Assert.False(layout.TableShown);
        Assert.Equal(80, layout.RowsLeftOut);
        Assert.DoesNotContain("δ(H1)/ppm", svg);
        Assert.Contains("left out", svg);
    }

    [Fact]
    public void Arrays_off_the_measured_axis_are_refused()
    {
        var sample = FigureSamples.Fit();
        var data = sample with { Traces = [sample.Traces[0] with { Residual = new double[10] }] };
        var e = Assert.Throws<ArgumentException>(() => FitFigure.Create(data, Options));
        Assert.Contains("Residual has 10 points", e.Message);
    }

    [Fact]
    public void Small_residual_keeps_the_scale_of_the_spectra()
    {
        var model = FitFigure.Create(FigureSamples.Fit(), Options);
        var main = model.Axes.Single(a => a.Key == FitFigure.MainAxis(0));
        var residual = model.Axes.Single(a => a.Key == FitFigure.ResidualAxis(0));
        var mainPerFraction = (main.Maximum - main.Minimum) / (main.EndPosition - main.StartPosition);
        var residualPerFraction = (residual.Maximum - residual.Minimum) / (residual.EndPosition - residual.StartPosition);
        Assert.Equal(mainPerFraction, residualPerFraction, 9);
    }
}
