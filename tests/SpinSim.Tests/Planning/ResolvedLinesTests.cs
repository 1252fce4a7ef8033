using SpinSim.Core.Planning;
using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Planning;

/// <summary>The dip criterion of <see cref="ResolvedLines"/> (common practice, no source) on Lorentzian pairs.</summary>
public class ResolvedLinesTests
{
    private static double[] Lorentzians(params (double CentreHz, double Area)[] lines)
    {
        // 1 Hz lines sampled every 1/32 Hz over +-20 Hz.
        var y = new double[1281];
        for (var i = 0; i < y.Length; i++)
        {
            var x = -20 + i / 32.0;
            foreach (var (c, a) in lines) y[i] += a * Lineshape.LorentzianDensityPerHz(x - c, 1.0);
        }
        return y;
    }

    [Fact]
    public void EqualLorentziansOneWidthApartAreTwoLines() =>
        // Midpoint 1.0, maxima about 1.2 (in units of one line's height): the dip is 0.83 of them, below 0.9.
        Assert.Equal(2, ResolvedLines.Count(Lorentzians((-0.5, 1), (0.5, 1))));

    [Fact]
    public void EqualLorentziansCloserThanTheCriterionAreOneLine()
    {
        // At 0.8 FWHM a dip exists (they merge below 1/sqrt(3) FWHM) but is only 0.94 of the maxima.
        Assert.Equal(1, ResolvedLines.Count(Lorentzians((-0.4, 1), (0.4, 1))));
        Assert.Equal(1, ResolvedLines.Count(Lorentzians((-0.25, 1), (0.25, 1))));
    }

    [Fact]
    public void MaximaBelowOnePercentOfTheTallestAreNotCounted()
    {
        Assert.Equal(1, ResolvedLines.Count(Lorentzians((0, 1), (10, 0.005))));
        Assert.Equal(2, ResolvedLines.Count(Lorentzians((0, 1), (10, 0.02))));
    }

    [Fact]
    public void AShoulderMergedIntoATallerLineIsMeasuredFromTheTallerOne()
    {
        // A weak line on the flank of a strong one shows no maximum of its own; a third line far away still counts.
        Assert.Equal(2, ResolvedLines.Count(Lorentzians((0, 1), (0.6, 0.3), (8, 1))));
    }

    [Fact]
    public void FlatOrEmptyTracesHaveNoLines()
    {
        Assert.Equal(0, ResolvedLines.Count([]));
        Assert.Equal(0, ResolvedLines.Count(new double[10]));
    }
}
