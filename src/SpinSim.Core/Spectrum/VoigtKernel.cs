using System.Numerics;
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
/// </remarks>
internal sealed unsafe class VoigtKernel
{
    private const double FineReach = 16;
    private const int FineStepsPerUnit = 128;
    private const double CoarseReach = 100;
    private const int CoarseStepsPerUnit = 8;

    private static readonly double TwoOverSqrtPi = 2 / Math.Sqrt(Math.PI);
    private static VoigtKernel? _lastBuilt;

    // Monomial coefficients of each interval's quintic in t = (|x| - x_j) / h, six per interval: the fine intervals
    // first, then the coarse ones (from interval FineIntervals on).
    private readonly double[] _table;
    private const int FineIntervals = (int)(FineReach * FineStepsPerUnit);

    private VoigtKernel(double y)
    {
        Y = y;
        _table = [.. Tabulate(y, 0, FineReach, FineStepsPerUnit), .. Tabulate(y, FineReach, CoarseReach, CoarseStepsPerUnit)];
    }

    public double Y { get; }

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
        return Interpolate(_table, a < FineReach ? a * FineStepsPerUnit : FineIntervals + (a - FineReach) * CoarseStepsPerUnit);
    }

    /// <summary>
    /// Adds <paramref name="scale"/> Re w(x_j + iY) at x_j = <paramref name="x0"/> + j <paramref name="dx"/> to
    /// <paramref name="target"/>[j] for every j: a line's near field. Four points at a time with AVX2 (each lane's
    /// coefficients loaded and transposed), each the same quintic as <see cref="RealPart"/>; points past the tables go
    /// one by one.
    /// </summary>
    public void AddRealPart(Span<double> target, double x0, double dx, double scale)
    {
        var j = 0;
        if (Avx2.IsSupported && Fma.IsSupported && target.Length >= 4)
        {
            var ramp = Vector256.Create(0.0, 1, 2, 3) * dx;
            var (fine, coarse, coarseFrom) = (Vector256.Create((double)FineStepsPerUnit), Vector256.Create((double)CoarseStepsPerUnit), Vector256.Create(FineReach));
            var (coarseOffset, reach, vscale) = (Vector256.Create(FineIntervals - FineReach * CoarseStepsPerUnit), Vector256.Create(CoarseReach), Vector256.Create(scale));
            var six = Vector128.Create(6);
            fixed (double* table = _table)
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
                    var index = Sse41.MultiplyLow(interval, six);
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

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double Interpolate(double[] table, double position)
    {
        int j = (int)position;
        double t = position - j;
        var c = table.AsSpan(6 * j, 6);
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
        var table = new double[6 * intervals];
        var (f0, d0, s0) = Node(from, y, h);
        for (int j = 0; j < intervals; j++)
        {
            var (f1, d1, s1) = Node(from + (j + 1) * h, y, h);
            int k = 6 * j;
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
