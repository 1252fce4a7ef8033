using System.Numerics;
using SpinSim.Core.LinearAlgebra;

namespace SpinSim.Tests.LinearAlgebra;

/// <summary>A fact that needs the system FFTW; skipped with the reason where libfftw3.so.3 is missing (CI installs it).</summary>
public sealed class NativeFftFactAttribute : TheoryAttribute
{
    public NativeFftFactAttribute()
    {
        if (!Fft.NativeAvailable)
            Skip = "libfftw3.so.3 not found or failed its self-test: install libfftw3-double3 to compare the native and managed transforms";
    }
}

public class FftTests
{
    private static Complex[] Random(int n, int seed)
    {
        var random = new Random(seed);
        return Enumerable.Range(0, n).Select(_ => new Complex(random.NextDouble() - 0.5, random.NextDouble() - 0.5)).ToArray();
    }

    /// <summary>The definition of the DFT, summed directly: X_k = sum_j x_j e^(sign 2 pi i jk/n).</summary>
    private static Complex[] Direct(Complex[] x, int sign) => Enumerable.Range(0, x.Length)
        .Select(k => Enumerable.Range(0, x.Length).Aggregate(Complex.Zero,
            (sum, j) => sum + x[j] * Complex.FromPolarCoordinates(1, sign * 2 * Math.PI * ((long)j * k % x.Length) / x.Length)))
        .ToArray();

    private static void AssertClose(Complex[] expected, Complex[] actual, double relative)
    {
        var scale = expected.Max(c => c.Magnitude);
        var worst = expected.Zip(actual).Max(p => (p.First - p.Second).Magnitude);
        Assert.True(worst <= relative * scale, $"largest difference {worst / scale:E2} of the largest value");
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(7)]      // prime: no radix-2 route
    [InlineData(96)]
    [InlineData(1024)]
    public void Both_directions_follow_the_definition_of_the_dft(int n)
    {
        // Source: the DFT's definition, summed directly (O(n^2)); unscaled in both directions.
        var x = Random(n, n);
        var forward = (Complex[])x.Clone();
        Fft.Forward(forward);
        AssertClose(Direct(x, -1), forward, 1e-12);
        var inverse = (Complex[])x.Clone();
        Fft.Inverse(inverse);
        AssertClose(Direct(x, +1), inverse, 1e-12);
        // The managed fallback too, whichever of the two the machine runs by default.
        var managed = (Complex[])x.Clone();
        Fft.Managed(managed, -1);
        AssertClose(Direct(x, -1), managed, 1e-12);
    }

    [NativeFftFact]
    [InlineData(131_072, 1e-12)]
    [InlineData(65_536 + 2 * 3 * 5 * 7, 1e-10)] // MathNet takes Bluestein's route here, whose own roundoff is about 2e-11
    public void Native_transform_agrees_with_mathnet_on_long_arrays(int n, double tolerance)
    {
        // Reference library: MathNet.Numerics' managed transform (Fourier.Forward/Inverse with no scaling).
        foreach (var sign in new[] { -1, +1 })
        {
            var x = Random(n, 3);
            var (native, managed) = ((Complex[])x.Clone(), (Complex[])x.Clone());
            Fft.Native(native, sign);
            Fft.Managed(managed, sign);
            AssertClose(managed, native, tolerance);
            // The native pair's own accuracy, independent of MathNet: back and forth gives n x (exact invariant).
            Fft.Native(native, -sign);
            AssertClose(x.Select(c => c * n).ToArray(), native, 1e-13);
        }
    }

    [Fact]
    public void Inverse_of_forward_is_n_times_the_input()
    {
        // Exact invariant of the unscaled pair.
        var x = Random(4_096, 9);
        var y = (Complex[])x.Clone();
        Fft.Forward(y);
        Fft.Inverse(y);
        AssertClose(x.Select(c => c * x.Length).ToArray(), y, 1e-13);
    }

    [NativeFftFact]
    [InlineData(1_024)]
    [InlineData(131_072)]
    public void Arrays_of_every_alignment_transform_alike(int n)
    {
        // FFTW's vector code needs 16-byte alignment, and its vector and scalar code differ in the last bits: the same
        // data at every offset of 8 bytes within 64, through spans of one pinned array of doubles, must give MathNet's
        // transform, and bit for bit the same result at every offset (exact invariant: a result must not depend on where
        // an array lies). Reference library: MathNet.Numerics' managed transform.
        var x = Random(n, 11);
        var expected = (Complex[])x.Clone();
        Fft.Managed(expected, -1);
        var storage = GC.AllocateArray<double>(2 * n + 8, pinned: true);
        Complex[]? first = null;
        for (var skip = 0; skip < 8; skip++)
        {
            var view = System.Runtime.InteropServices.MemoryMarshal.Cast<double, Complex>(storage.AsSpan(skip, 2 * n));
            x.CopyTo(view);
            Fft.Forward(view);
            AssertClose(expected, view.ToArray(), 1e-12);
            first ??= view.ToArray();
            Assert.True(first.AsSpan().SequenceEqual(view), $"offset {8 * skip} bytes: not the same bits as offset 0");
        }
    }

    [Fact]
    public unsafe void Aligned_arrays_start_on_64_bytes_and_come_cleared()
    {
        // Exact invariants of the pool: the first point on a 64-byte boundary, the points cleared on every rent.
        var first = AlignedComplexArray.Rent(1_000);
        Assert.Equal(0, (long)first.Pointer % 64);
        Assert.Equal(1_000, first.Span.Length);
        first.Span.Fill(new Complex(3, 4));
        first.Return();
        var again = AlignedComplexArray.Rent(1_000);
        Assert.Equal(0, (long)again.Pointer % 64);
        Assert.All(again.Span.ToArray(), c => Assert.Equal(Complex.Zero, c));
        again.Return();
    }
}
