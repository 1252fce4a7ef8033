using System.Numerics;
using MathNet.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SpinSim.Core.Spectrum;

/// <summary>
/// Re w(x + iy) along one horizontal line y = const, the reduced Voigt profile shared by every line of one
/// <see cref="Lineshape"/>: y = sqrt(ln 2) f_L / f_G depends on the Gaussian share only, not on the width.
/// </summary>
/// <remarks>
/// The Faddeeva function needs dozens of dependent divisions near the centre, too slow for the tens of millions
/// of points a crowded spectrum has. Up to |x| = 100 the kernel interpolates tables of w and its first two
/// derivatives (quintic Hermite; spacing 1/128 up to |x| = 16, 1/8 beyond, where the profile is smooth);
/// past |x| = 100 it inlines the four-term asymptotic series. The derivatives are exact,
/// w' = -2z w + 2i / sqrt(pi) and w'' = -2w - 2z w'. The interpolation error is at most
/// h^6 max|f^(6)| / 46080: below 1e-15 of the peak near the centre and far smaller in the wings. The tests
/// hold the kernel to the Faddeeva function within 1e-13 of the peak and 1e-11 of the local value (seen:
/// 1.3e-14 and 1.3e-12).
/// <para>A sweep along many points (<see cref="AddRealPart"/>) takes points beyond <see cref="WingFrom"/> from the
/// wing series instead, a real polynomial in 1/x^2 that costs a fraction of a table look-up.</para>
/// </remarks>
internal sealed unsafe class VoigtKernel
{
    private const double FineReach = 16;
    private const int FineStepsPerUnit = 128;
    private const double CoarseReach = 100;
    private const int CoarseStepsPerUnit = 8;

    private static readonly double TwoOverSqrtPi = 2 / Math.Sqrt(Math.PI);
    private static VoigtKernel? _lastBuilt;

    // Monomial coefficients of each interval's quintic in t = (|x| - x_j) / h, six per interval in rows of eight (two
    // zeros), each row one 64-byte cache line: the fine intervals first, then the coarse ones (from FineIntervals on).
    // The rows live in a pinned array (it never moves), from its first 64-byte boundary on.
    private const int RowLength = 8;
    private readonly double[] _storage;
    private readonly double* _rows;
    private const int FineIntervals = (int)(FineReach * FineStepsPerUnit);

    // The wing series: Re w(x + iy) = sum_i _wing[i] x^-(2i + 2) beyond WingFrom, to within WingTolerance of the peak.
    private const int WingTerms = 14;
    private const double WingTolerance = 1e-13;
    private readonly double[] _wing;

    private VoigtKernel(double y)
    {
        Y = y;
        // One coarse interval beyond CoarseReach: |x| just below it can round to the interval that starts there.
        double[] rows = [.. Tabulate(y, 0, FineReach, FineStepsPerUnit), .. Tabulate(y, FineReach, CoarseReach + 1.0 / CoarseStepsPerUnit, CoarseStepsPerUnit)];
        _storage = GC.AllocateArray<double>(rows.Length + RowLength, pinned: true);
        fixed (double* start = _storage)
        {
            var skip = (int)((64 - (nint)start % 64) % 64) / sizeof(double);
            rows.CopyTo(_storage, skip);
            _rows = start + skip;
        }
        _wing = WingCoefficients(y);
        WingFrom = WingRadius(y);
    }

    public double Y { get; }

    /// <summary>
    /// |x| from which <see cref="AddRealPart"/> takes the wing series: there it is within 1e-13 of the peak Re w(iY) of
    /// the Faddeeva function (by the remainder bound in <see cref="WingRadius"/>).
    /// </summary>
    public double WingFrom { get; }

    /// <summary>The kernel for <paramref name="y"/> &gt;= 0; the last one built is reused, since a fit renders one shape many times.</summary>
    public static VoigtKernel For(double y)
    {
        var last = Volatile.Read(ref _lastBuilt);
        if (last is not null && last.Y == y) return last;
        var built = new VoigtKernel(y);
        Volatile.Write(ref _lastBuilt, built);
        return built;
    }

    /// <summary>Re w(x + iY).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double RealPart(double x)
    {
        double a = Math.Abs(x);
        if (a >= CoarseReach)
            return Faddeeva.FarWingRealPart(a, Y);
        return Interpolate(_rows, a < FineReach ? a * FineStepsPerUnit : FineIntervals + (a - FineReach) * CoarseStepsPerUnit);
    }

    /// <summary>
    /// Adds <paramref name="scale"/> Re w(x_j + iY) at x_j = <paramref name="x0"/> + j <paramref name="dx"/> to
    /// <paramref name="target"/>[j] for every j: a line's near field. Within <see cref="WingFrom"/> four points at a time
    /// with AVX2 (each lane's coefficients loaded and transposed), each the same quintic as <see cref="RealPart"/>
    /// (points past the tables one by one); beyond it the wing series, within 1e-13 of the peak.
    /// </summary>
    public void AddRealPart(Span<double> target, double x0, double dx, double scale)
    {
        // The points with |x| < WingFrom form one run (x is monotonic in j): the table there, the wing series either side.
        double from = (-WingFrom - x0) / dx, to = (WingFrom - x0) / dx;
        if (dx < 0) (from, to) = (to, from);
        if (dx == 0) (from, to) = Math.Abs(x0) < WingFrom ? (0.0, target.Length - 1.0) : (target.Length, target.Length);
        var first = (int)Math.Clamp(Math.Ceiling(from), 0, target.Length);
        var end = (int)Math.Clamp(Math.Floor(to) + 1, first, target.Length);
        AddWing(target[..first], x0, dx, scale);
        AddTable(target[first..end], x0 + first * dx, dx, scale);
        AddWing(target[end..], x0 + end * dx, dx, scale);
    }

    /// <summary>The wing series at x0 + j dx, eight or four points at a time where the processor has the vectors.</summary>
    private void AddWing(Span<double> target, double x0, double dx, double scale)
    {
        var c = _wing;
        var j = 0;
        fixed (double* output = target)
        {
            if (Vector512.IsHardwareAccelerated && target.Length >= 8)
            {
                var ramp = Vector512.Create(0.0, 1, 2, 3, 4, 5, 6, 7) * dx;
                var (one, vscale) = (Vector512<double>.One, Vector512.Create(scale));
                for (; j <= target.Length - 8; j += 8)
                {
                    var x = Vector512.Create(x0 + j * dx) + ramp;
                    var u = one / (x * x);
                    var p = Vector512.Create(c[WingTerms - 1]);
                    for (var i = WingTerms - 2; i >= 0; i--) p = Vector512.FusedMultiplyAdd(p, u, Vector512.Create(c[i]));
                    Vector512.FusedMultiplyAdd(vscale, p * u, Vector512.Load(output + j)).Store(output + j);
                }
            }
            if (Vector256.IsHardwareAccelerated && target.Length - j >= 4)
            {
                var ramp = Vector256.Create(0.0, 1, 2, 3) * dx;
                var (one, vscale) = (Vector256<double>.One, Vector256.Create(scale));
                for (; j <= target.Length - 4; j += 4)
                {
                    var x = Vector256.Create(x0 + j * dx) + ramp;
                    var u = one / (x * x);
                    var p = Vector256.Create(c[WingTerms - 1]);
                    for (var i = WingTerms - 2; i >= 0; i--) p = Vector256.FusedMultiplyAdd(p, u, Vector256.Create(c[i]));
                    Vector256.FusedMultiplyAdd(vscale, p * u, Vector256.Load(output + j)).Store(output + j);
                }
            }
        }
        for (; j < target.Length; j++) target[j] += scale * WingSeries(x0 + j * dx);
    }

    /// <summary>The wing series at one point, sum_i c_i x^-(2i + 2): within 1e-13 of the peak from <see cref="WingFrom"/> on.</summary>
    internal double WingSeries(double x)
    {
        var u = 1 / (x * x);
        var p = _wing[WingTerms - 1];
        for (var i = WingTerms - 2; i >= 0; i--) p = Math.FusedMultiplyAdd(p, u, _wing[i]);
        return p * u;
    }

    /// <summary>The tables at x0 + j dx, four points at a time with AVX2.</summary>
    private void AddTable(Span<double> target, double x0, double dx, double scale)
    {
        var j = 0;
        if (Avx512F.IsSupported && Avx2.IsSupported && target.Length >= 8)
        {
            var ramp = Vector512.Create(0.0, 1, 2, 3, 4, 5, 6, 7) * dx;
            var (fine, coarse, coarseFrom) = (Vector512.Create((double)FineStepsPerUnit), Vector512.Create((double)CoarseStepsPerUnit), Vector512.Create(FineReach));
            var (coarseOffset, reach, vscale) = (Vector512.Create(FineIntervals - FineReach * CoarseStepsPerUnit), Vector512.Create(CoarseReach), Vector512.Create(scale));
            // Transpose selectors: pairs of rows interleaved, then quarters, then halves.
            var (evenPairs, oddPairs) = (Vector512.Create(0L, 1, 8, 9, 4, 5, 12, 13), Vector512.Create(2L, 3, 10, 11, 6, 7, 14, 15));
            var (lowHalves, highHalves) = (Vector512.Create(0L, 1, 2, 3, 8, 9, 10, 11), Vector512.Create(4L, 5, 6, 7, 12, 13, 14, 15));
            var table = _rows;
            fixed (double* output = target)
            {
                for (; j <= target.Length - 8; j += 8)
                {
                    var a = Vector512.Abs(Vector512.Create(x0 + j * dx) + ramp);
                    if (Vector512.GreaterThanOrEqualAny(a, reach))
                    {
                        for (var k = j; k < j + 8; k++) output[k] += scale * RealPart(x0 + k * dx);
                        continue;
                    }
                    var position = Vector512.ConditionalSelect(Vector512.LessThan(a, coarseFrom), a * fine, Avx512F.FusedMultiplyAdd(a, coarse, coarseOffset));
                    var interval = Avx512F.ConvertToVector256Int32WithTruncation(position);
                    var t = position - Avx512F.ConvertToVector512Double(interval);
                    var index = Avx2.ShiftLeftLogical(interval, 3);
                    // Each lane's row (six coefficients, two zeros) in one aligned load, the eight rows transposed.
                    var (m0, m1) = (Vector512.Load(table + index.GetElement(0)), Vector512.Load(table + index.GetElement(1)));
                    var (m2, m3) = (Vector512.Load(table + index.GetElement(2)), Vector512.Load(table + index.GetElement(3)));
                    var (m4, m5) = (Vector512.Load(table + index.GetElement(4)), Vector512.Load(table + index.GetElement(5)));
                    var (m6, m7) = (Vector512.Load(table + index.GetElement(6)), Vector512.Load(table + index.GetElement(7)));
                    // Lanes (k: coefficient k of rows r, r+1) for even and odd k, then gathered four rows at a time.
                    var (e01, o01) = (Avx512F.UnpackLow(m0, m1), Avx512F.UnpackHigh(m0, m1));
                    var (e23, o23) = (Avx512F.UnpackLow(m2, m3), Avx512F.UnpackHigh(m2, m3));
                    var (e45, o45) = (Avx512F.UnpackLow(m4, m5), Avx512F.UnpackHigh(m4, m5));
                    var (e67, o67) = (Avx512F.UnpackLow(m6, m7), Avx512F.UnpackHigh(m6, m7));
                    // Rows 0-3: coefficients (0, 4), (1, 5), (2, 6), (3, 7); likewise rows 4-7.
                    var (q04, q15) = (Avx512F.PermuteVar8x64x2(e01, evenPairs, e23), Avx512F.PermuteVar8x64x2(o01, evenPairs, o23));
                    var (q26, q37) = (Avx512F.PermuteVar8x64x2(e01, oddPairs, e23), Avx512F.PermuteVar8x64x2(o01, oddPairs, o23));
                    var (r04, r15) = (Avx512F.PermuteVar8x64x2(e45, evenPairs, e67), Avx512F.PermuteVar8x64x2(o45, evenPairs, o67));
                    var (r26, r37) = (Avx512F.PermuteVar8x64x2(e45, oddPairs, e67), Avx512F.PermuteVar8x64x2(o45, oddPairs, o67));
                    var (c0, c4) = (Avx512F.PermuteVar8x64x2(q04, lowHalves, r04), Avx512F.PermuteVar8x64x2(q04, highHalves, r04));
                    var (c1, c5) = (Avx512F.PermuteVar8x64x2(q15, lowHalves, r15), Avx512F.PermuteVar8x64x2(q15, highHalves, r15));
                    var (c2, c3) = (Avx512F.PermuteVar8x64x2(q26, lowHalves, r26), Avx512F.PermuteVar8x64x2(q37, lowHalves, r37));
                    var p = Avx512F.FusedMultiplyAdd(t, c5, c4);
                    p = Avx512F.FusedMultiplyAdd(t, p, c3);
                    p = Avx512F.FusedMultiplyAdd(t, p, c2);
                    p = Avx512F.FusedMultiplyAdd(t, p, c1);
                    p = Avx512F.FusedMultiplyAdd(t, p, c0);
                    Avx512F.FusedMultiplyAdd(vscale, p, Vector512.Load(output + j)).Store(output + j);
                }
            }
        }
        if (Avx2.IsSupported && Fma.IsSupported && target.Length - j >= 4)
        {
            var ramp = Vector256.Create(0.0, 1, 2, 3) * dx;
            var (fine, coarse, coarseFrom) = (Vector256.Create((double)FineStepsPerUnit), Vector256.Create((double)CoarseStepsPerUnit), Vector256.Create(FineReach));
            var (coarseOffset, reach, vscale) = (Vector256.Create(FineIntervals - FineReach * CoarseStepsPerUnit), Vector256.Create(CoarseReach), Vector256.Create(scale));
            var table = _rows;
            fixed (double* output = target)
            {
                for (; j <= target.Length - 4; j += 4)
                {
                    var a = Vector256.Abs(Vector256.Create(x0 + j * dx) + ramp);
                    if (Vector256.GreaterThanOrEqualAny(a, reach))
                    {
                        for (var k = j; k < j + 4; k++) output[k] += scale * RealPart(x0 + k * dx);
                        continue;
                    }
                    // Position in intervals: a * 128 below 16, 2048 + (a - 16) * 8 beyond (FMA: a * 8 + (2048 - 128)).
                    var position = Vector256.ConditionalSelect(Vector256.LessThan(a, coarseFrom), a * fine, Fma.MultiplyAdd(a, coarse, coarseOffset));
                    var interval = Avx.ConvertToVector128Int32WithTruncation(position);
                    var t = position - Avx.ConvertToVector256Double(interval);
                    var index = Sse2.ShiftLeftLogical(interval, 3);
                    // Each lane's six coefficients are contiguous: load them row by row and transpose (hardware gathers
                    // are slower on some processors).
                    double* r0 = table + index.GetElement(0), r1 = table + index.GetElement(1), r2 = table + index.GetElement(2), r3 = table + index.GetElement(3);
                    var (a0, a1, a2, a3) = (Avx.LoadVector256(r0), Avx.LoadVector256(r1), Avx.LoadVector256(r2), Avx.LoadVector256(r3));
                    var (low01, high01, low23, high23) = (Avx.UnpackLow(a0, a1), Avx.UnpackHigh(a0, a1), Avx.UnpackLow(a2, a3), Avx.UnpackHigh(a2, a3));
                    var c0 = Avx.Permute2x128(low01, low23, 0x20);
                    var c1 = Avx.Permute2x128(high01, high23, 0x20);
                    var c2 = Avx.Permute2x128(low01, low23, 0x31);
                    var c3 = Avx.Permute2x128(high01, high23, 0x31);
                    var (e02, e13) = (Vector256.Create(Sse2.LoadVector128(r0 + 4), Sse2.LoadVector128(r2 + 4)), Vector256.Create(Sse2.LoadVector128(r1 + 4), Sse2.LoadVector128(r3 + 4)));
                    var (c4, c5) = (Avx.UnpackLow(e02, e13), Avx.UnpackHigh(e02, e13));
                    var p = Fma.MultiplyAdd(t, c5, c4);
                    p = Fma.MultiplyAdd(t, p, c3);
                    p = Fma.MultiplyAdd(t, p, c2);
                    p = Fma.MultiplyAdd(t, p, c1);
                    p = Fma.MultiplyAdd(t, p, c0);
                    Fma.MultiplyAdd(vscale, p, Avx.LoadVector256(output + j)).Store(output + j);
                }
            }
        }
        for (; j < target.Length; j++) target[j] += scale * RealPart(x0 + j * dx);
    }

    /// <summary>
    /// The wing series' coefficients: w(z) = (i / sqrt(pi)) E[1 / (x - zeta)] with zeta = t - iy and t normal of variance
    /// 1/2 (w as the Gaussian average of a Lorentzian), so Re w = sum_K Re(i mu_K) / (sqrt(pi) x^(K+1)) with the moments
    /// mu_K = E zeta^K (mu_(K+1) = -iy mu_K + (K / 2) mu_(K-1), Stein's identity); Re(i mu_K) vanishes for even K.
    /// </summary>
    private static double[] WingCoefficients(double y)
    {
        var mu = new Complex[2 * WingTerms];
        mu[0] = 1;
        mu[1] = new Complex(0, -y);
        for (var k = 1; k < mu.Length - 1; k++) mu[k + 1] = new Complex(0, -y) * mu[k] + 0.5 * k * mu[k - 1];
        var c = new double[WingTerms];
        for (var i = 0; i < WingTerms; i++) c[i] = -mu[2 * i + 1].Imaginary / Math.Sqrt(Math.PI);
        return c;
    }

    /// <summary>
    /// The least |x| from which the wing series' remainder is within <see cref="WingTolerance"/> of the peak. The remainder
    /// after the terms below K = 2 <see cref="WingTerms"/> is (i / sqrt(pi)) E[zeta^K / (x^K (x - zeta))]. Where
    /// |t| &lt;= a |x| (a = 0.7), |x - zeta| is at least (1 - a) |x|; elsewhere at least y. So it is at most
    /// (E|zeta|^K / ((1 - a) |x|) + E[|zeta|^K; |t| &gt; a |x|] / y) / (sqrt(pi) |x|^K), where |zeta|^K = (t^2 + y^2)^(K/2)
    /// is a polynomial in t^2, whose Gaussian moments are Gamma(j + 1/2) / sqrt(pi) over the whole line and
    /// Gamma(j + 1/2, a^2 x^2) / sqrt(pi) beyond |t| = a |x| (upper incomplete gamma).
    /// </summary>
    private static double WingRadius(double y)
    {
        const int half = WingTerms;
        const double split = 0.7;
        double Moment(double beyond)
        {
            double sum = 0;
            for (var j = 0; j <= half; j++)
                sum += SpecialFunctions.Binomial(half, j) * Math.Pow(y, 2 * (half - j))
                    * (beyond == 0 ? SpecialFunctions.Gamma(j + 0.5) : SpecialFunctions.GammaUpperIncomplete(j + 0.5, beyond * beyond));
            return sum / Math.Sqrt(Math.PI);
        }
        var whole = Moment(0);
        // Twice the bound: room for the special functions' own rounding.
        double Bound(double x) => 2 * (whole / ((1 - split) * x) + Moment(split * x) / y) / (Math.Sqrt(Math.PI) * Math.Pow(x, 2 * half));
        var limit = WingTolerance * Faddeeva.RealPart(0, y);
        // The bound falls with |x|: bisect between a point that fails and one that holds, in log |x|.
        double low = 1e-3, high = 1e-3;
        for (var doubling = 0; doubling < 64 && !(Bound(high) <= limit); doubling++) (low, high) = (high, 2 * high);
        for (var i = 0; i < 60; i++)
        {
            var middle = Math.Sqrt(low * high);
            if (Bound(middle) > limit) low = middle;
            else high = middle;
        }
        return high;
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double Interpolate(double* rows, double position)
    {
        int j = (int)position;
        double t = position - j;
        var c = rows + RowLength * j;
        double p = Math.FusedMultiplyAdd(t, c[5], c[4]);
        p = Math.FusedMultiplyAdd(t, p, c[3]);
        p = Math.FusedMultiplyAdd(t, p, c[2]);
        p = Math.FusedMultiplyAdd(t, p, c[1]);
        return Math.FusedMultiplyAdd(t, p, c[0]);
    }

    private static double[] Tabulate(double y, double from, double to, int stepsPerUnit)
    {
        int intervals = (int)Math.Round((to - from) * stepsPerUnit);
        double h = 1.0 / stepsPerUnit;
        var table = new double[RowLength * intervals];
        var (f0, d0, s0) = Node(from, y, h);
        for (int j = 0; j < intervals; j++)
        {
            var (f1, d1, s1) = Node(from + (j + 1) * h, y, h);
            int k = RowLength * j;
            table[k] = f0;
            table[k + 1] = d0;
            table[k + 2] = 0.5 * s0;
            table[k + 3] = -10 * f0 - 6 * d0 - 1.5 * s0 + 0.5 * s1 - 4 * d1 + 10 * f1;
            table[k + 4] = 15 * f0 + 8 * d0 + 1.5 * s0 - s1 + 7 * d1 - 15 * f1;
            table[k + 5] = -6 * f0 - 3 * d0 - 0.5 * s0 + 0.5 * s1 - 3 * d1 + 6 * f1;
            (f0, d0, s0) = (f1, d1, s1);
        }
        return table;
    }

    /// <summary>Re w, and its first and second x-derivatives scaled by h and h^2, at x + iy.</summary>
    private static (double Value, double Slope, double Curvature) Node(double x, double y, double h)
    {
        var z = new Complex(x, y);
        var w = Faddeeva.W(z);
        var w1 = -2 * z * w + new Complex(0, TwoOverSqrtPi);
        var w2 = -2 * w - 2 * z * w1;
        // Along x, d/dx w(x + iy) = w'(z), so the real parts give the derivatives of Re w.
        return (w.Real, h * w1.Real, h * h * w2.Real);
    }
}
