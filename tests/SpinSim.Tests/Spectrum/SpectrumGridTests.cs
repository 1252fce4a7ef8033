using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Spectrum;

public class SpectrumGridTests
{
    [Fact]
    public void Points_RunEvenlyFromFromPpmToToPpm()
    {
        var grid = new SpectrumGrid(10, 0, 11, 400);
        Assert.Equal(10.0, grid.PpmAt(0));
        Assert.Equal(0.0, grid.PpmAt(10));
        Assert.Equal(3.0, grid.PpmAt(7), 14);
        Assert.Equal(-1.0, grid.StepPpm);
        Assert.Equal(-400.0, grid.StepHz);
    }

    [Fact]
    public void HzAt_CountsFromTrueZeroPpm()
    {
        // Convention (science notes, Units and signs): nu [Hz] = delta [ppm] x SF [MHz]; the reference offset
        // moves true 0 ppm to +offset on the axis.
        var grid = new SpectrumGrid(10, 0, 11, 400, ReferenceOffsetPpm: 0.5);
        Assert.Equal((10 - 0.5) * 400, grid.HzAt(0), 9);
        Assert.Equal(-0.5 * 400, grid.HzAt(10), 9);
    }

    [Theory]
    [InlineData(10, 0, 1, 400, 0)]                         // one point
    [InlineData(5, 5, 100, 400, 0)]                        // empty range
    [InlineData(double.NaN, 0, 100, 400, 0)]
    [InlineData(10, double.PositiveInfinity, 100, 400, 0)]
    [InlineData(10, 0, 100, 0, 0)]                         // no field
    [InlineData(10, 0, 100, -400, 0)]
    [InlineData(10, 0, 100, double.NaN, 0)]
    [InlineData(10, 0, 100, 400, double.NaN)]
    public void Constructor_RejectsInvalidGrids(double fromPpm, double toPpm, int points, double observeMHz, double offsetPpm) =>
        Assert.ThrowsAny<ArgumentException>(() => new SpectrumGrid(fromPpm, toPpm, points, observeMHz, offsetPpm));

    [Fact]
    public void PpmAt_RejectsIndicesOffTheGrid()
    {
        var grid = new SpectrumGrid(10, 0, 11, 400);
        Assert.Throws<ArgumentOutOfRangeException>(() => grid.PpmAt(-1));
        Assert.Throws<ArgumentOutOfRangeException>(() => grid.PpmAt(11));
    }

    [Fact]
    public void WindowFor_AddsTenthOfPpm_AroundNarrowLines()
    {
        RenderLine[] lines = [new(1 * 400, 1, 1), new(2 * 400, 1, 1)];
        var (from, to) = SpectrumGrid.WindowFor(lines, 400);
        Assert.Equal(2.1, from, 12);
        Assert.Equal(0.9, to, 12);
    }

    [Fact]
    public void WindowFor_AddsTenWidths_AroundBroadLines_AndFollowsTheOffset()
    {
        // 10 widths of 10 Hz at 400 MHz = 0.25 ppm, more than 0.1 ppm.
        RenderLine[] lines = [new(1 * 400, 1, 10), new(2 * 400, 1, 1)];
        var (from, to) = SpectrumGrid.WindowFor(lines, 400, referenceOffsetPpm: -0.04);
        Assert.Equal(2.25 - 0.04, from, 12);
        Assert.Equal(0.75 - 0.04, to, 12);
    }

    [Fact]
    public void WindowFor_RejectsNoLines() =>
        Assert.Throws<ArgumentException>(() => SpectrumGrid.WindowFor([], 400));
}
