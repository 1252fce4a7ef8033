using System.Globalization;
using System.Numerics;
using MathNet.Numerics;
using SpinSim.Core.Spectrum;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Spectrum;

public class FaddeevaTests
{
    // The accuracy Faddeeva claims: relative error of w as a complex number. The largest seen against the
    // files below is about 2e-15, and about 4e-15 on a denser mpmath sweep made while developing it.
    private const double ClaimedRelativeError = 1e-14;

    [ReferenceFact]
    public void W_MatchesJohnsonTestVectors()
    {
        // Source: S. G. Johnson's Faddeeva Package test vectors (WolframAlpha and Maple values, rechecked with
        // mpmath), reference-data/faddeeva/w_values.csv; includes |z| up to 1e160 and both half planes.
        var rows = ReadRows("w_values.csv");
        Assert.Equal(46, rows.Count);
        AssertAllWithin(rows, ClaimedRelativeError);
    }

    [ReferenceFact]
    public void W_MatchesMpmathGrid()
    {
        // Source: mpmath at 50 digits, reference-data/faddeeva/w_grid_mpmath.csv (the Voigt region, y > 0).
        var rows = ReadRows("w_grid_mpmath.csv");
        Assert.Equal(42, rows.Count);
        AssertAllWithin(rows, ClaimedRelativeError);
    }

    [ReferenceFact]
    public void W_FollowsJohnsonSpecialCases()
    {
        // Source: S. G. Johnson's Faddeeva Package special-value vectors (IEEE conventions for infinite and
        // NaN input), reference-data/faddeeva/w_special.csv.
        var rows = ReadRows("w_special.csv");
        Assert.Equal(11, rows.Count);
        foreach (var (x, y, expected) in rows)
        {
            var w = Faddeeva.W(new Complex(x, y));
            Assert.True(SameIeee(expected.Real, w.Real) && SameIeee(expected.Imaginary, w.Imaginary),
                $"w({x}, {y}) = {w}, expected {expected}");
        }
    }

    [ReferenceFact]
    public void RealPart_EqualsRealPartOfW_InUpperHalfPlane()
    {
        // Source: the same two reference files; the fast path must agree with the full function exactly.
        foreach (var (x, y, expected) in ReadRows("w_grid_mpmath.csv").Concat(ReadRows("w_values.csv")))
        {
            if (!(y >= 0)) continue;
            Assert.Equal(Faddeeva.W(new Complex(x, y)).Real, Faddeeva.RealPart(x, y));
            Assert.True(Math.Abs(Faddeeva.RealPart(x, y) - expected.Real) <= ClaimedRelativeError * expected.Magnitude,
                $"Re w({x}, {y})");
        }
    }

    [Theory]
    [InlineData(0.01)]
    [InlineData(0.3)]
    [InlineData(1.0)]
    [InlineData(1.2847)]   // near the power-series boundary on the imaginary axis
    [InlineData(4.3)]
    [InlineData(4.5)]      // just past the continued-fraction boundary
    [InlineData(12.0)]
    public void W_OnImaginaryAxis_IsScaledComplementaryErrorFunction(double y)
    {
        // Closed form: w(iy) = exp(y^2) erfc(y) (Abramowitz and Stegun 7.1.3); erfc from Math.NET Numerics,
        // an independent implementation, good to about 1e-15 relative in this range.
        double expected = Math.Exp(y * y) * SpecialFunctions.Erfc(y);
        var w = Faddeeva.W(new Complex(0, y));
        Assert.Equal(0.0, w.Imaginary);
        Assert.True(Math.Abs(w.Real - expected) <= 1e-13 * expected, $"w(i{y}) = {w.Real:R}, expected {expected:R}");
    }

    [Theory]
    [InlineData(0.3)]
    [InlineData(2.0)]
    [InlineData(6.0)]
    [InlineData(7.5)]
    public void W_OnRealAxis_HasGaussianRealPart(double x)
    {
        // Closed form: for real x, erfc(-ix) = 1 + i erfi(x), so Re w(x) = exp(-x^2) (Abramowitz and Stegun 7.1.3).
        double expected = Math.Exp(-x * x);
        Assert.True(Math.Abs(Faddeeva.W(new Complex(x, 0)).Real - expected) <= 1e-15 * expected);
    }

    [Fact]
    public void W_IsContinuousAcrossItsRegionBoundaries()
    {
        // Internal consistency (no outside source): the power series, Taylor expansion and continued fraction
        // must agree where Poppe and Wijers switch between them (rho = 0.292 and rho = 1 on the ellipse
        // with semi-axes 6.3 and 4.4).
        foreach (double rho in new[] { 0.292, 1.0 })
        {
            for (double t = 0; t <= Math.PI / 2; t += Math.PI / 40)
            {
                var zIn = new Complex((rho - 1e-13) * 6.3 * Math.Cos(t), (rho - 1e-13) * 4.4 * Math.Sin(t));
                var zOut = new Complex((rho + 1e-13) * 6.3 * Math.Cos(t), (rho + 1e-13) * 4.4 * Math.Sin(t));
                var inside = Faddeeva.W(zIn);
                var outside = Faddeeva.W(zOut);
                // Allow for the true change between the two points: w'(z) = -2z w(z) + 2i/sqrt(pi).
                var derivative = -2 * zIn * inside + new Complex(0, 2 / Math.Sqrt(Math.PI));
                double allowed = ClaimedRelativeError * inside.Magnitude + derivative.Magnitude * (zOut - zIn).Magnitude;
                Assert.True((inside - outside).Magnitude <= allowed,
                    $"jump {(inside - outside).Magnitude / inside.Magnitude:E2} at rho {rho}, angle {t}");
            }
        }
    }

    [Fact]
    public void W_HasReflectionSymmetry()
    {
        // Identity: w(-conj z) = conj w(z) for every z (from the definition).
        foreach (var z in new[] { new Complex(1.3, 0.7), new Complex(0.2, -3.1), new Complex(8, 1e-5), new Complex(30, -2) })
        {
            var left = Faddeeva.W(new Complex(-z.Real, z.Imaginary));
            var right = Complex.Conjugate(Faddeeva.W(z));
            Assert.True((left - right).Magnitude <= 1e-15 * right.Magnitude, $"at {z}");
        }
    }

    [Fact]
    public void W_OverflowsToInfinity_FarDownTheLowerHalfPlane()
    {
        // Closed form: w(-iy) = 2 exp(y^2) - exp(y^2) erfc(y), real and beyond the double range for y = 40.
        var onAxis = Faddeeva.W(new Complex(0, -40));
        Assert.Equal(double.PositiveInfinity, onAxis.Real);
        Assert.Equal(0.0, onAxis.Imaginary);
        // |w| ~ 2 exp(y^2 - x^2) = exp(1e400): both components infinite, never NaN.
        var offAxis = Faddeeva.W(new Complex(1, -1e200));
        Assert.True(double.IsInfinity(offAxis.Real) && double.IsInfinity(offAxis.Imaginary), offAxis.ToString());
    }

    private static void AssertAllWithin(List<(double X, double Y, Complex W)> rows, double tolerance)
    {
        var worst = rows
            .Select(r => (r.X, r.Y, Error: (Faddeeva.W(new Complex(r.X, r.Y)) - r.W).Magnitude / r.W.Magnitude))
            .MaxBy(r => r.Error);
        Assert.True(worst.Error <= tolerance, $"relative error {worst.Error:E2} at z = ({worst.X:R}, {worst.Y:R})");
    }

    private static bool SameIeee(double expected, double actual) =>
        double.IsNaN(expected) ? double.IsNaN(actual) : expected == actual;

    private static List<(double X, double Y, Complex W)> ReadRows(string file) =>
        File.ReadLines(ReferenceData.PathOf("faddeeva", file))
            .Skip(1)
            .Where(line => line.Length > 0)
            .Select(line => line.Split(','))
            .Select(f => (ParseIeee(f[0]), ParseIeee(f[1]), new Complex(ParseIeee(f[2]), ParseIeee(f[3]))))
            .ToList();

    private static double ParseIeee(string text) => text.Trim() switch
    {
        "Inf" => double.PositiveInfinity,
        "-Inf" => double.NegativeInfinity,
        "NaN" => double.NaN,
        var t => double.Parse(t, NumberStyles.Float, CultureInfo.InvariantCulture),
    };
}
