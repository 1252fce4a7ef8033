using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Spectrum;

public class VoigtKernelTests
{
    /// <summary>Reduced Lorentzian widths y from nearly Gaussian to nearly Lorentzian; sqrt(ln 2) gives equal components.</summary>
    public static TheoryData<double> Widths { get; } = [1e-3, 0.1, 0.8325546111576977, 3.0, 20.0, 150.0];

    [Theory]
    [MemberData(nameof(Widths))]
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
    /// The near-field sweep gives each point within <see cref="VoigtKernel.WingFrom"/> exactly what the kernel gives it
    /// alone (the same quintic, eight or four points at a time), across the fine and coarse tables and the asymptotic
    /// wing, for every span length and remainder; beyond it the wing series, held to the Faddeeva function.
    /// </summary>
    [Theory]
    // Equal components (y = sqrt(ln 2)): the series from |x| = 6.9, so these spans meet the fine table and the wings.
    [InlineData(0.8325546111576977, -20.0, 0.013, 3100)]   // through the fine table, both sides of zero, and both wings
    [InlineData(0.8325546111576977, -120.0, 0.07, 3500)]   // from the far wing through the table and out again
    [InlineData(0.8325546111576977, -9.5, 0.0137, 1400)]   // into the core from the wing series and out the other side
    [InlineData(0.8325546111576977, 8.99, 0.003, 61)]      // a short span across the start of the wing series
    [InlineData(0.8325546111576977, 3.0, -0.2, 1)]         // one point, stepping down
    [InlineData(0.8325546111576977, 40.0, -0.2, 401)]      // stepping down, from the wing through the core into the other
    // Nearly Lorentzian (y = 150): the series only from |x| = 450, so the coarse table and the asymptotic edge are swept.
    [InlineData(150.0, -20.0, 0.013, 3100)]                // across both tables, the fine one on both sides of zero
    [InlineData(150.0, 15.9, 0.0001, 7)]                   // a short span across the fine-coarse boundary, with a remainder
    [InlineData(150.0, 99.9, 0.03, 13)]                    // across the edge of the tables at 100
    [InlineData(150.0, -130.0, 0.07, 3800)]                // from beyond the tables through all of them and out again
    [InlineData(20.0, -70.0, 0.0211, 6700)]                // the coarse table out to the series at 60
    public void A_sweep_adds_the_kernel_within_its_core_and_the_faddeeva_function_beyond(double y, double x0, double dx, int points)
    {
        // References: the kernel point by point (itself held to Faddeeva.RealPart above) within the core, and
        // Faddeeva.RealPart (checked against Johnson's test vectors and mpmath in FaddeevaTests) beyond it.
        var kernel = VoigtKernel.For(y);
        var target = Enumerable.Range(0, points).Select(j => 0.25 * j).ToArray();
        kernel.AddRealPart(target, x0, dx, 1.7);
        var peak = kernel.RealPart(0);
        int core = 0, wing = 0;
        for (var j = 0; j < points; j++)
        {
            var x = x0 + j * dx;
            var added = target[j] - 0.25 * j;
            if (Math.Abs(x) < kernel.WingFrom - 1e-9)
            {
                Assert.Equal(1.7 * kernel.RealPart(x), added, 1e-15 * Math.Max(1, 0.25 * j));
                core++;
            }
            else if (Math.Abs(x) > kernel.WingFrom + 1e-9)
            {
                Assert.True(Math.Abs(added - 1.7 * Faddeeva.RealPart(x, kernel.Y)) <= 1e-13 * 1.7 * peak + 1e-15 * 0.25 * j, $"x = {x}");
                wing++;
            }
        }
        Assert.True(core + wing >= points - 2);
    }

    [Theory]
    [InlineData(150.0)]
    [InlineData(3.0)]
    public void The_kernel_holds_up_to_the_edge_of_its_tables(double y)
    {
        // Just below |x| = 100 the table position can round up to the interval that starts at 100, one past the coarse
        // table's last: the kernel alone and a sweep must still give the Faddeeva function there (reference as above).
        var kernel = VoigtKernel.For(y);
        var peak = Faddeeva.RealPart(0, y);
        foreach (var x in new[] { Math.BitDecrement(100.0), 100 - 1e-14, -Math.BitDecrement(100.0), 99.99999999 })
            Assert.True(Math.Abs(kernel.RealPart(x) - Faddeeva.RealPart(x, y)) <= 1e-13 * peak, $"x = {x:R}");
        var target = new double[16];
        kernel.AddRealPart(target, Math.BitDecrement(100.0), 0, 1);
        Assert.All(target, v => Assert.True(Math.Abs(v - Faddeeva.RealPart(100, y)) <= 1e-13 * peak, $"{v:R}"));
    }

    [Theory]
    [MemberData(nameof(Widths))]
    public void The_wing_series_holds_from_where_it_starts_and_not_far_inside(double y)
    {
        // Reference: Faddeeva.RealPart (FaddeevaTests). The series is asymptotic: from WingFrom on it must be within
        // 1e-13 of the peak (the remainder bound says so); well inside, at a quarter of that, it must not be (else the
        // bound, and with it the table's share of the sweep, would be far larger than needed, or the series wrong).
        var kernel = VoigtKernel.For(y);
        var peak = Faddeeva.RealPart(0, y);
        var worst = 0.0;
        for (var k = 0; k <= 4000; k++)
        {
            var x = kernel.WingFrom * Math.Pow(50, k / 4000.0);
            worst = Math.Max(worst, Math.Abs(kernel.WingSeries(x) - Faddeeva.RealPart(x, y)));
        }
        Assert.True(worst <= 1e-13 * peak, $"wing from {kernel.WingFrom}: error {worst / peak:E2} of the peak");
        var inside = 0.25 * kernel.WingFrom;
        Assert.True(Math.Abs(kernel.WingSeries(inside) - Faddeeva.RealPart(inside, y)) > 1e-13 * peak, $"wing from {kernel.WingFrom}");
    }
}
