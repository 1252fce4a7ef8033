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
}
