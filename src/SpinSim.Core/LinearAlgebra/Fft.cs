using System.Numerics;
using System.Runtime.InteropServices;
using MathNet.Numerics.IntegralTransforms;

namespace SpinSim.Core.LinearAlgebra;

/// <summary>
/// Unscaled complex discrete Fourier transforms, in place: <see cref="Forward"/> X_k = sum_j x_j e^(-2 pi i jk/n),
/// <see cref="Inverse"/> the same with e^(+2 pi i jk/n) and no 1/n. The system FFTW 3 (Debian: libfftw3-double3,
/// library libfftw3.so.3) does them when it loads and passes a small self-test; otherwise MathNet.Numerics' managed
/// transform does, with the same results. Measured here (2 cores, 131,072 points): MathNet 15 ms a transform, FFTW
/// about ten times less, and the trace synthesiser does eight such transforms a trace.
/// </summary>
/// <remarks>
/// FFTW's planner is not thread-safe, its execution is: plans are made once per length and direction under a lock,
/// with FFTW_ESTIMATE (no timing runs, arrays untouched) and FFTW_UNALIGNED (managed arrays carry no 16-byte
/// alignment promise), and then executed on the caller's pinned array with fftw_execute_dft. System.Numerics.Complex
/// is two doubles, real then imaginary, which is FFTW's fftw_complex.
/// </remarks>
public static unsafe class Fft
{
    private const string Library = "libfftw3.so.3";
    private const int ForwardSign = -1, BackwardSign = +1;
    private const uint Estimate = 1u << 6, Unaligned = 1u << 1;

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
    public static void Forward(Complex[] data)
    {
        if (NativeLoads.Value) Native(data, ForwardSign);
        else Managed(data, ForwardSign);
    }

    /// <summary>x_j = sum_k X_k e^(+2 pi i jk/n), unscaled (no 1/n), in place.</summary>
    public static void Inverse(Complex[] data)
    {
        if (NativeLoads.Value) Native(data, BackwardSign);
        else Managed(data, BackwardSign);
    }

    /// <summary>MathNet's transform, for the fallback and for tests that compare the two.</summary>
    internal static void Managed(Complex[] data, int sign)
    {
        if (sign < 0) Fourier.Forward(data, FourierOptions.NoScaling);
        else Fourier.Inverse(data, FourierOptions.NoScaling);
    }

    internal static void Native(Complex[] data, int sign)
    {
        if (data.Length == 0) return;
        var plan = PlanFor(data.Length, sign);
        fixed (Complex* p = data) ExecuteDft(plan, p, p);
    }

    private static nint PlanFor(int n, int sign)
    {
        lock (PlanLock)
        {
            if (Plans.TryGetValue((n, sign), out var plan)) return plan;
            // In place: the plan is made on one buffer as input and output. FFTW_ESTIMATE leaves the buffer untouched.
            var buffer = new Complex[n];
            fixed (Complex* p = buffer) plan = PlanDft1d(n, p, p, sign, Estimate | Unaligned);
            if (plan == 0) throw new InvalidOperationException($"FFTW could not plan a transform of {n} points");
            Plans[(n, sign)] = plan;
            return plan;
        }
    }

    /// <summary>Loads FFTW and checks one small transform of each direction against the managed one.</summary>
    private static bool SelfTest()
    {
        try
        {
            var x = Enumerable.Range(0, 12).Select(j => new Complex(Math.Cos(0.7 * j) + 0.1 * j, Math.Sin(1.3 * j))).ToArray();
            foreach (var sign in new[] { ForwardSign, BackwardSign })
            {
                var (native, managed) = ((Complex[])x.Clone(), (Complex[])x.Clone());
                Native(native, sign);
                Managed(managed, sign);
                if (native.Zip(managed).Any(p => (p.First - p.Second).Magnitude > 1e-12)) return false;
            }
            return true;
        }
        catch (Exception e) when (e is DllNotFoundException or EntryPointNotFoundException or BadImageFormatException or InvalidOperationException)
        {
            return false;
        }
    }
}
