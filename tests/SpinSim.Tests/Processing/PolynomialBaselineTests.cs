using SpinSim.Core.Processing;

namespace SpinSim.Tests.Processing;

/// <summary>
/// The iterative polynomial baseline (Lieber and Mahadevan-Jansen, Appl. Spectrosc. 57, 1363, 2003): points above the
/// fit are lowered to it and the fit repeated, so positive lines never pull the baseline up.
/// </summary>
public class PolynomialBaselineTests
{
    private static double Poly(double x) => 0.3 - 0.12 * x + 0.05 * x * x; // invented smooth baseline, x in -1..1

    private static double[] Axis(int n) => Enumerable.Range(0, n).Select(i => 2.0 * i / (n - 1) - 1).ToArray();

    [Theory]
    [InlineData(0)]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    public void A_polynomial_of_the_fitted_order_is_its_own_baseline(int order)
    {
        // Exact invariant: least squares reproduces a polynomial of at most the fitted order, and nothing lies above it.
        var x = Axis(501);
        var y = x.Select(v => Enumerable.Range(0, order + 1).Sum(k => (k + 1) * 0.1 * Math.Pow(v, k))).ToArray();
        var baseline = PolynomialBaseline.Fit(y, order);
        Assert.All(y.Zip(baseline), p => Assert.Equal(p.First, p.Second, 1e-12));
    }

    [Fact]
    public void Positive_lines_on_a_curved_baseline_leave_the_baseline_in_place()
    {
        // The method's property: the fit converges from above onto the points free of lines, so with noise-free data
        // the quadratic under six tall lines comes back to within 1e-4 of the tallest line (invented trace; Gaussian
        // lines, whose wings vanish, so that the points between them lie on the quadratic itself).
        var x = Axis(4001);
        double[] centres = [-0.8, -0.55, -0.1, 0.05, 0.4, 0.75];
        var y = x.Select(v => Poly(v) + centres.Sum(c => Math.Exp(-0.5 * Math.Pow((v - c) / 0.004, 2)))).ToArray();
        var baseline = PolynomialBaseline.Fit(y, 2);
        var worst = x.Select((v, i) => Math.Abs(baseline[i] - Poly(v))).Max();
        Assert.True(worst <= 1e-4, $"baseline off by up to {worst:E2} (tallest line 1)");
        // A plain least-squares quadratic through the same points is pulled up by the lines: the iteration matters.
        var plain = MathNet.Numerics.Fit.Polynomial(x, y, 2);
        Assert.True(Math.Abs(plain[0] - 0.3) > 10 * worst, $"plain fit's constant {plain[0]:G4} is as good as the iterated one");
    }
}
