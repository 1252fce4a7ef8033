using System.Numerics;
using System.Runtime.InteropServices;
using MathNet.Numerics.IntegralTransforms;

namespace SpinSim.Core.LinearAlgebra;

/// <summary>
/// Unscaled complex discrete Fourier transforms, in place: <see cref="Forward"/> X_k = sum_j x_j e^(-2 pi i jk/n),
/// <see cref="Inverse"/> the same with e^(+2 pi i jk/n) and no 1/n. The system FFTW 3 (Debian: libfftw3-double3,
/// library libfftw3.so.3) does them when it loads and passes a small self-test; otherwise MathNet.Numerics' managed
/// transform does, with the same results. Measured here (2 cores, 131,072 points): MathNet 15 ms a transform, FFTW
/// 1.4 ms on an unaligned array and 0.5 ms on an aligned one; the trace synthesiser does eight such transforms a trace.
/// </summary>
/// <remarks>
/// FFTW's planner is not thread-safe, its execution is: plans are made once per length and direction under a lock,
/// with FFTW_ESTIMATE (no timing runs, arrays untouched) on a 64-byte-aligned array, and then executed with
/// fftw_execute_dft on arrays of that alignment only. FFTW's vector code needs 16-byte alignment, which managed arrays
/// do not promise: <see cref="AlignedComplexArray"/> gives it (2.7 times faster at 131,072 points), and any other array
/// is transformed in an aligned copy, so that every transform runs the same code and its result does not depend on
/// where the array lies. System.Numerics.Complex is two doubles, real then imaginary, which is FFTW's fftw_complex.
/// </remarks>
public static unsafe class Fft
{
    private const string Library = "libfftw3.so.3";
    private const int ForwardSign = -1, BackwardSign = +1;
    private const uint Estimate = 1u << 6;

    [DllImport(Library, EntryPoint = "fftw_plan_dft_1d")]
    private static extern nint PlanDft1d(int n, Complex* input, Complex* output, int sign, uint flags);

    [DllImport(Library, EntryPoint = "fftw_execute_dft")]
    private static extern void ExecuteDft(nint plan, Complex* input, Complex* output);

    private static readonly Lock PlanLock = new();
    private static readonly Dictionary<(int N, int Sign), nint> Plans = [];
    private static readonly Lazy<bool> NativeLoads = new(SelfTest);

    /// <summary>Which implementation runs: "native FFTW 3 (libfftw3.so.3)" or "managed (MathNet.Numerics)".</summary>
    public static string Name => NativeLoads.Value ? "native FFTW 3 (libfftw3.so.3)" : "managed (MathNet.Numerics)";

    /// <summary>True when the system FFTW loaded and passed its self-test.</summary>
    public static bool NativeAvailable => NativeLoads.Value;

    /// <summary>X_k = sum_j x_j e^(-2 pi i jk/n), unscaled, in place.</summary>
    public static void Forward(Span<Complex> data)
    {
        if (NativeLoads.Value) Native(data, ForwardSign);
        else Managed(data, ForwardSign);
    }

    /// <summary>x_j = sum_k X_k e^(+2 pi i jk/n), unscaled (no 1/n), in place.</summary>
    public static void Inverse(Span<Complex> data)
    {
        if (NativeLoads.Value) Native(data, BackwardSign);
        else Managed(data, BackwardSign);
    }

    /// <summary>MathNet's transform, for the fallback and for tests that compare the two.</summary>
    internal static void Managed(Span<Complex> data, int sign)
    {
        // MathNet transforms whole arrays: a span is copied in and out.
        var array = data.ToArray();
        if (sign < 0) Fourier.Forward(array, FourierOptions.NoScaling);
        else Fourier.Inverse(array, FourierOptions.NoScaling);
        array.CopyTo(data);
    }

    internal static void Native(Span<Complex> data, int sign)
    {
        if (data.Length == 0) return;
        fixed (Complex* p = data)
        {
            if ((long)p % 64 == 0)
            {
                ExecuteDft(PlanFor(data.Length, sign, p), p, p);
                return;
            }
        }
        // Not on a 64-byte boundary: transformed in an aligned copy, so that the result never depends on where the
        // caller's array happens to lie (FFTW's vector and scalar code differ in the last bits).
        var aligned = AlignedComplexArray.Rent(data.Length);
        var copy = aligned.Span;
        data.CopyTo(copy);
        fixed (Complex* q = copy) ExecuteDft(PlanFor(data.Length, sign, q), q, q);
        copy.CopyTo(data);
        aligned.Return();
    }

    /// <summary>The plan for <paramref name="n"/> points in place, made on <paramref name="aligned"/> (on a 64-byte boundary) the first time.</summary>
    private static nint PlanFor(int n, int sign, Complex* aligned)
    {
        lock (PlanLock)
        {
            if (Plans.TryGetValue((n, sign), out var plan)) return plan;
            // In place, on the caller's pinned array: FFTW_ESTIMATE leaves it untouched.
            plan = PlanDft1d(n, aligned, aligned, sign, Estimate);
            if (plan == 0) throw new InvalidOperationException($"FFTW could not plan a transform of {n} points");
            Plans[(n, sign)] = plan;
            return plan;
        }
    }

    private static bool SelfTest()
    {
        try
        {
            // Against the DFT's definition summed directly, not MathNet: its transform of 12 points runs Bluestein's
            // algorithm in parallel, and the first transform is often asked for from parallel workers that then all
            // wait on this check, so the pool had to grow a thread to finish it (about a second at start-up).
            var x = Enumerable.Range(0, 12).Select(j => new Complex(Math.Cos(0.7 * j) + 0.1 * j, Math.Sin(1.3 * j))).ToArray();
            foreach (var sign in new[] { ForwardSign, BackwardSign })
            {
                var native = (Complex[])x.Clone();
                Native(native, sign);
                for (var k = 0; k < x.Length; k++)
                {
                    var direct = Complex.Zero;
                    for (var j = 0; j < x.Length; j++) direct += x[j] * Complex.FromPolarCoordinates(1, sign * 2 * Math.PI * (j * k % x.Length) / x.Length);
                    if ((native[k] - direct).Magnitude > 1e-12) return false;
                }
            }
            return true;
        }
        catch (Exception e) when (e is DllNotFoundException or EntryPointNotFoundException or BadImageFormatException or InvalidOperationException)
        {
            return false;
        }
    }
}
