using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Spectrum;

public class VoigtKernelTests
{
    [Theory]
    [InlineData(1e-3)]
    [InlineData(0.1)]
    [InlineData(0.8325546111576977)] // sqrt(ln 2): equal Lorentzian and Gaussian components
    [InlineData(3.0)]
    [InlineData(20.0)]
    [InlineData(150.0)]
    public void Kernel_MatchesFaddeeva_AcrossTablesAndWings(double y)
    {
        // Reference: Faddeeva.RealPart, itself checked against Johnson's test vectors and mpmath (FaddeevaTests).
        // Seen: at most 1.3e-14 of the peak, and 1.3e-12 of the local value (at y = 1e-3, where the Gaussian
        // core has fallen to 1e-11 and the Lorentzian wing is small).
        var kernel = VoigtKernel.For(y);
        double peak = Faddeeva.RealPart(0, y);
        double worstOfPeak = 0, worstOfValue = 0;
        var random = new Random(1);
        var xs = Enumerable.Range(0, 20_000).Select(_ => 700 * (2 * random.NextDouble() - 1))
            .Concat(Enumerable.Range(0, 20_000).Select(_ => 20 * (2 * random.NextDouble() - 1)))
            .Concat([0, 16, -16, 15.999999999, 100, 99.99999999, 100.00000001, 1e6]);
        foreach (double x in xs)
        {
            double expected = Faddeeva.RealPart(x, y);
            double error = Math.Abs(kernel.RealPart(x) - expected);
            worstOfPeak = Math.Max(worstOfPeak, error / peak);
            worstOfValue = Math.Max(worstOfValue, error / expected);
        }
        Assert.True(worstOfPeak <= 1e-13, $"error {worstOfPeak:E2} of the peak");
        Assert.True(worstOfValue <= 1e-11, $"error {worstOfValue:E2} of the value");
    }

    /// <summary>
    /// The near-field sweep (four points at a time where the processor gathers) gives each point what the kernel gives
    /// it alone, across the fine and coarse tables and the asymptotic wing, for every span length and remainder.
    /// </summary>
    [Theory]
    [InlineData(-20.0, 0.013, 3100)]   // across both tables, the fine one on both sides of zero
    [InlineData(-120.0, 0.07, 3500)]   // from the asymptotic wing through every table and out again
    [InlineData(15.9, 0.0001, 7)]      // a short span across the fine-coarse boundary, with a remainder
    [InlineData(99.9, 0.03, 13)]       // across the edge of the tables
    [InlineData(3.0, -0.2, 1)]         // one point, stepping down
    public void A_sweep_adds_the_same_values_as_the_kernel_point_by_point(double x0, double dx, int points)
    {
        var kernel = VoigtKernel.For(0.8325546111576977);
        var target = Enumerable.Range(0, points).Select(j => 0.25 * j).ToArray();
        kernel.AddRealPart(target, x0, dx, 1.7);
        var peak = kernel.RealPart(0);
        for (var j = 0; j < points; j++)
            Assert.Equal(0.25 * j + 1.7 * kernel.RealPart(x0 + j * dx), target[j], 1e-15 * Math.Max(1, 0.25 * j + 1.7 * peak));
    }
}
