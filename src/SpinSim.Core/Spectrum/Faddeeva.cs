// Method: G. P. M. Poppe and C. M. J. Wijers, ACM Trans. Math. Softw. 16, 38 (1990), refining W. Gautschi, SIAM J. Numer. Anal. 7, 187 (1970).
using System.Numerics;
using System.Runtime.CompilerServices;

namespace SpinSim.Core.Spectrum;

/// <summary>
/// The Faddeeva function w(z) = exp(-z^2) erfc(-iz), the complex kernel of the Voigt profile.
/// </summary>
/// <remarks>
/// In the upper half plane three regions are used, as Poppe and Wijers set them out: near the origin
/// the power series of erf (Abramowitz and Stegun 7.1.5), far out Laplace's continued fraction, and in
/// between Gautschi's Taylor expansion whose derivatives come from the continued fraction. The region
/// boundaries and term counts are the published ones, quoted here from memory of the paper and confirmed
/// by the tests. Beyond |z| of 1e8 three terms of the asymptotic series are exact to double precision and avoid
/// overflow in the recurrences. The lower half plane follows from w(z) = 2 exp(-z^2) - w(-z).
/// <para>
/// Accuracy, verified against S. G. Johnson's test vectors and against mpmath (see the tests): relative
/// error of w as a complex number, |w - w_exact| / |w_exact|, below 1e-14 for every finite input (largest
/// seen about 4e-15, on 15,000 points from |z| = 1e-6 to 1e300 in all four quadrants). A component much
/// smaller than |w| carries an error relative to |w|, not to itself: close to the real axis with |x| above
/// about 6, Re w (about exp(-x^2)) is small beside Im w (about 1/(sqrt(pi) x)) and is good to about 1e-17
/// absolute only.
/// </para>
/// </remarks>
public static class Faddeeva
{
    private const double TwoOverSqrtPi = 1.1283791670955125738961589031215452;
    private const double OneOverSqrtPi = 0.5641895835477562869480794515607726;

    // Poppe and Wijers scale x by 6.3 and y by 4.4 so that one elliptic radius, rho, chooses the region.
    private const double XScale = 6.3;
    private const double YScale = 4.4;
    private const double PowerSeriesRhoSquared = 0.085264; // 0.292^2
    private const double AsymptoticModulus = 1e8;

    // Past |z| = 16 eight terms of the asymptotic series are good to 1e-15 (the first term left out is
    // 7918 / |z|^16) and cost one division where the continued fraction needs ten or more: this is most of a
    // Voigt line's wings.
    private const double WingModulusSquared = 16 * 16;

    /// <summary>w(z) for any z, finite or not. Infinite and NaN inputs follow IEEE conventions (see remarks).</summary>
    /// <remarks>
    /// w tends to 0 as z goes to infinity in the closed upper half plane and along the real axis; on the
    /// negative imaginary axis it grows without bound (w(-i inf) = +inf); elsewhere in the lower half plane
    /// at infinity the phase of exp(-z^2) is undefined and the result is NaN. A NaN input gives NaN, except
    /// that w stays real on the imaginary axis (x = 0).
    /// Where the true value exceeds the double range the overflowing component is infinite.
    /// </remarks>
    public static Complex W(Complex z)
    {
        double x = z.Real, y = z.Imaginary;
        if (double.IsNaN(x) || double.IsNaN(y))
            return new Complex(double.NaN, x == 0 ? 0 : double.NaN);
        if (double.IsInfinity(x) || double.IsInfinity(y))
            return AtInfinity(x, y);

        if (y >= 0)
        {
            var (re, im) = FirstQuadrant(Math.Abs(x), y);
            // w(-x + iy) = conj(w(x + iy)).
            return new Complex(re, x < 0 ? -im : im);
        }

        // Lower half plane: w(z) = 2 exp(-z^2) - w(-z), and -z = -x + i|y| lies in the upper half plane.
        var (ur, ui) = FirstQuadrant(Math.Abs(x), -y);
        double minusZRe = ur, minusZIm = x > 0 ? -ui : ui;
        var (er, ei) = TwiceExpMinusZSquared(x, y);
        return new Complex(er - minusZRe, ei - minusZIm);
    }

    /// <summary>
    /// Re w(x + iy) for y &gt;= 0, the Voigt kernel, without the bookkeeping for the lower half plane and
    /// for non-finite input. Same algorithm and accuracy as <see cref="W"/>. For y &lt; 0 it falls back to
    /// <see cref="W"/>.
    /// </summary>
    public static double RealPart(double x, double y)
    {
        if (!(y >= 0) || !double.IsFinite(x) || double.IsInfinity(y))
            return W(new Complex(x, y)).Real;
        // Re w is even in x in the upper half plane.
        return FirstQuadrant(Math.Abs(x), y).Re;
    }

    private static Complex AtInfinity(double x, double y)
    {
        if (y >= 0 || double.IsFinite(y))
            return Complex.Zero; // exp(-z^2) vanishes when |x| -> inf with y finite; w ~ i/(sqrt(pi) z) -> 0
        return x == 0 ? new Complex(double.PositiveInfinity, 0) : new Complex(double.NaN, double.NaN);
    }

    /// <summary>2 exp(-z^2), with the modulus split so that no intermediate overflows before the result does.</summary>
    /// <remarks>
    /// Far from the origin the exponent and phase reach hundreds or thousands, where one rounding of y^2 - x^2
    /// or of 2xy alone would cost 1e-13 relative. Both are therefore carried with their rounding errors
    /// (error-free products by fused multiply-add), so the result is as accurate as exp, sin and cos themselves.
    /// </remarks>
    private static (double Re, double Im) TwiceExpMinusZSquared(double x, double y)
    {
        // Re(-z^2) = y^2 - x^2; the factored form cannot overflow, so it decides underflow first.
        double growth = (y - x) * (y + x);
        if (growth < -750)
            return (0, 0); // below the smallest subnormal, whatever the phase (which may be huge or undefined)
        if (growth > 1500)
        {
            // Beyond the double range even after a small cosine; the squares below could overflow to NaN.
            var (s, c) = Math.SinCos(-2 * x * y);
            return (Overflowed(c), Overflowed(s));
        }

        double y2 = y * y, y2Err = Math.FusedMultiplyAdd(y, y, -y2);
        double x2 = x * x, x2Err = Math.FusedMultiplyAdd(x, x, -x2);
        double exponent = y2 - x2;
        double sumErr = TwoSumError(y2, -x2, exponent);
        double exponentLow = sumErr + (y2Err - x2Err);

        // Phase of exp(-z^2) is -2xy = -(p + pErr).
        double p = 2 * x * y, pErr = Math.FusedMultiplyAdd(2 * x, y, -p);
        var (sinP, cosP) = Math.SinCos(p);
        double cos = cosP - pErr * sinP;
        double sin = -(sinP + pErr * cosP);

        double half = Math.Exp(0.5 * exponent);
        double scale = 2 * (1 + exponentLow);
        return (scale * cos * half * half, scale * sin * half * half);
    }

    private static double Overflowed(double direction) =>
        direction == 0 ? 0 : double.IsNaN(direction) ? double.NaN : Math.CopySign(double.PositiveInfinity, direction);

    /// <summary>The rounding error of sum = a + b (Knuth's two-sum).</summary>
    private static double TwoSumError(double a, double b, double sum)
    {
        double bVirtual = sum - a;
        double aVirtual = sum - bVirtual;
        return (a - aVirtual) + (b - bVirtual);
    }

    /// <summary>w(x + iy) for x &gt;= 0, y &gt;= 0, both finite.</summary>
    private static (double Re, double Im) FirstQuadrant(double x, double y)
    {
        if (x > AsymptoticModulus || y > AsymptoticModulus)
            return Asymptotic(x, y);

        if (x * x + y * y > WingModulusSquared)
            return Wing(x, y);

        double xs = x / XScale, ys = y / YScale;
        double rhoSquared = xs * xs + ys * ys;

        if (rhoSquared < PowerSeriesRhoSquared)
            return PowerSeries(x, y, Math.Sqrt(rhoSquared), ys);

        double h;
        int taylorTerms, fractionDepth;
        if (rhoSquared > 1)
        {
            h = 0;
            taylorTerms = 0;
            fractionDepth = (int)(3 + 1442 / (26 * Math.Sqrt(rhoSquared) + 77));
        }
        else
        {
            double q = (1 - ys) * Math.Sqrt(1 - rhoSquared);
            h = 1.88 * q;
            taylorTerms = (int)Math.Round(7 + 34 * q);
            fractionDepth = (int)Math.Round(16 + 26 * q);
        }

        // Backward recurrence r_n = 1 / (2 (h - iz + (n + 1) r_{n+1})): Laplace's continued fraction for
        // w(z + ih) and, through the products r_0 ... r_n, the Taylor coefficients of w about z + ih.
        double rRe = 0, rIm = 0, sRe = 0, sIm = 0;
        double twoH = 2 * h;
        double lambda = h > 0 ? Math.Pow(twoH, taylorTerms) : 0;
        for (int n = fractionDepth; n >= 0; n--)
        {
            int np1 = n + 1;
            double tRe = y + h + np1 * rRe;
            double tIm = x - np1 * rIm;
            double c = 0.5 / (tRe * tRe + tIm * tIm);
            rRe = c * tRe;
            rIm = c * tIm;
            if (h > 0 && n <= taylorTerms)
            {
                double aRe = lambda + sRe;
                double newSRe = rRe * aRe - rIm * sIm;
                sIm = rIm * aRe + rRe * sIm;
                sRe = newSRe;
                lambda /= twoH;
            }
        }

        double re = TwoOverSqrtPi * (h > 0 ? sRe : rRe);
        double im = TwoOverSqrtPi * (h > 0 ? sIm : rIm);
        // On the real axis Re w = exp(-x^2) exactly; the truncated fraction cannot resolve that term there.
        if (y == 0)
            re = Math.Exp(-x * x);
        return (re, im);
    }

    /// <summary>w = exp(-z^2) (1 + (2i / sqrt(pi)) sum_n z^(2n+1) / (n! (2n + 1))), near the origin.</summary>
    private static (double Re, double Im) PowerSeries(double x, double y, double rho, double ys)
    {
        int terms = (int)Math.Round(6 + 72 * (1 - 0.85 * ys) * rho);
        double z2Re = (x - y) * (x + y), z2Im = 2 * x * y;

        // Horner in z^2 for S = sum_n z^(2n) / (n! (2n + 1)).
        int j = 2 * terms + 1;
        double sRe = 1.0 / j, sIm = 0;
        for (int i = terms; i >= 1; i--)
        {
            j -= 2;
            double tRe = (sRe * z2Re - sIm * z2Im) / i;
            sIm = (sRe * z2Im + sIm * z2Re) / i;
            sRe = tRe + 1.0 / j;
        }

        // 1 + (2i / sqrt(pi)) z S
        double aRe = 1 - TwoOverSqrtPi * (sRe * y + sIm * x);
        double aIm = TwoOverSqrtPi * (sRe * x - sIm * y);
        double e = Math.Exp(-z2Re);
        var (sin, cos) = Math.SinCos(z2Im);
        double bRe = e * cos, bIm = -e * sin;
        return (aRe * bRe - aIm * bIm, aRe * bIm + aIm * bRe);
    }

    /// <summary>w ~ (i / sqrt(pi)) (1/z) sum_k (2k - 1)!! / (2 z^2)^k for 16 &lt; |z| &lt;= 1e8 in the first quadrant.</summary>
    /// <remarks>
    /// Terms are kept until the first one left out, (2k - 1)!! / (2^k |z|^2k), is below 1e-15: k = 0 to 7 up to
    /// |z| = 40, to 5 up to 100, to 3 beyond. In the upper half plane the series misses no exponentially small
    /// exp(-z^2) term except on the real axis itself, where Re w = exp(-x^2) is below 1e-111 here and is
    /// restored exactly for y = 0.
    /// </remarks>
    private static (double Re, double Im) Wing(double x, double y)
    {
        double r2 = x * x + y * y;
        double inverse = 1 / r2;
        double uRe = x * inverse, uIm = -y * inverse;
        double vRe = (uRe - uIm) * (uRe + uIm), vIm = 2 * uRe * uIm;

        // Horner in v = 1/z^2 with coefficients (2k - 1)!! / 2^k, highest first.
        double sRe, sIm;
        if (r2 > FarWingModulusSquared)
        {
            sRe = 15.0 / 8; sIm = 0;
        }
        else
        {
            if (r2 > 40 * 40)
            {
                sRe = 945.0 / 32; sIm = 0;
            }
            else
            {
                sRe = 135135.0 / 128 * vRe + 10395.0 / 64; sIm = 135135.0 / 128 * vIm;
                MultiplyAdd(ref sRe, ref sIm, vRe, vIm, 945.0 / 32);
            }
            MultiplyAdd(ref sRe, ref sIm, vRe, vIm, 105.0 / 16);
            MultiplyAdd(ref sRe, ref sIm, vRe, vIm, 15.0 / 8);
        }
        MultiplyAdd(ref sRe, ref sIm, vRe, vIm, 3.0 / 4);
        MultiplyAdd(ref sRe, ref sIm, vRe, vIm, 1.0 / 2);
        MultiplyAdd(ref sRe, ref sIm, vRe, vIm, 1.0);

        // i u S / sqrt(pi)
        double pRe = uRe * sRe - uIm * sIm, pIm = uRe * sIm + uIm * sRe;
        double re = y == 0 ? Math.Exp(-x * x) : -OneOverSqrtPi * pIm;
        return (re, OneOverSqrtPi * pRe);
    }

    /// <summary>Squared modulus beyond which <see cref="FarWingRealPart"/> applies.</summary>
    internal const double FarWingModulusSquared = 100 * 100;

    /// <summary>
    /// Re w(x + iy) for |z| &gt; 100 from the same four terms as <see cref="Wing"/>, in real arithmetic with one
    /// division, small enough to inline into a Voigt line's wings, where most of its points lie.
    /// </summary>
    /// <remarks>
    /// With q = 1/|z|^2 and t = y^2 q, Im(z^-(2k+1)) = -y q^(k+1) P_k(t), where P_k comes from expanding
    /// Im (x - iy)^(2k+1) with x^2 q = 1 - t: P_0 = 1, P_1 = 3 - 4t, P_2 = 5 - 20t + 16t^2,
    /// P_3 = 7 - 56t + 112t^2 - 64t^3.
    /// </remarks>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static double FarWingRealPart(double x, double y)
    {
        double q = 1 / Math.FusedMultiplyAdd(x, x, y * y);
        double t = y * y * q;
        // The coefficients (2k - 1)!! / 2^k are folded in: 0.5 P_1, 0.75 P_2 and (15/8) P_3.
        double c1 = Math.FusedMultiplyAdd(-2, t, 1.5);
        double c2 = Math.FusedMultiplyAdd(t, Math.FusedMultiplyAdd(12, t, -15), 3.75);
        double c3 = Math.FusedMultiplyAdd(t, Math.FusedMultiplyAdd(t, Math.FusedMultiplyAdd(-120, t, 210), -105), 13.125);
        double series = Math.FusedMultiplyAdd(q, Math.FusedMultiplyAdd(q, Math.FusedMultiplyAdd(q, c3, c2), c1), 1);
        return OneOverSqrtPi * y * q * series;
    }

    /// <summary>s = s v + c for complex s, v and real c.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void MultiplyAdd(ref double sRe, ref double sIm, double vRe, double vIm, double c)
    {
        double t = sRe * vRe - sIm * vIm + c;
        sIm = sRe * vIm + sIm * vRe;
        sRe = t;
    }

    /// <summary>w ~ (i / sqrt(pi)) (1/z) (1 + 1/(2 z^2) + 3/(4 z^4)), exact in double precision beyond |z| = 1e8.</summary>
    private static (double Re, double Im) Asymptotic(double x, double y)
    {
        // 1/z by Smith's division, safe up to the largest doubles.
        var u = Complex.One / new Complex(x, y);
        var u2 = u * u;
        var series = u * (1 + u2 * (0.5 + 0.75 * u2));
        // i * series / sqrt(pi)
        return (-OneOverSqrtPi * series.Imaginary, OneOverSqrtPi * series.Real);
    }
}
