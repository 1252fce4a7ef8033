using System.Numerics;
using System.Runtime.InteropServices;

namespace SpinSim.Core.LinearAlgebra;

/// <summary>
/// Plain single-threaded kernels for the many small matrices of a split or composite system, and for short vectors:
/// at a few dozen rows a library call's set-up (and MathNet's managed provider hands every product to its thread pool)
/// costs more than the arithmetic.
/// </summary>
internal static class SmallDense
{
    /// <summary>Products up to this many multiply-adds (m n k) go through <see cref="MultiplyTransposedA"/>.</summary>
    public const long Limit = 64L * 64 * 64;

    /// <summary>C (m x n) = A^T B with A (k x m) and B (k x n), all column-major: each entry is a dot product of two columns.</summary>
    public static void MultiplyTransposedA(int m, int n, int k, double[] a, double[] b, double[] c)
    {
        for (var j = 0; j < n; j++)
        {
            var bj = b.AsSpan(j * k, k);
            for (var i = 0; i < m; i++) c[i + (long)j * m] = Dot(a.AsSpan(i * k, k), bj);
        }
    }

    /// <summary>y += a x + b z over spans of equal length, vectorised.</summary>
    public static void AddScaled(Span<double> y, double a, ReadOnlySpan<double> x, double b, ReadOnlySpan<double> z)
    {
        var i = 0;
        if (Vector.IsHardwareAccelerated && y.Length >= Vector<double>.Count)
        {
            var vy = MemoryMarshal.Cast<double, Vector<double>>(y);
            var vx = MemoryMarshal.Cast<double, Vector<double>>(x);
            var vz = MemoryMarshal.Cast<double, Vector<double>>(z);
            var (va, vb) = (new Vector<double>(a), new Vector<double>(b));
            for (var k = 0; k < vy.Length; k++) vy[k] += va * vx[k] + vb * vz[k];
            i = vy.Length * Vector<double>.Count;
        }
        for (; i < y.Length; i++) y[i] += a * x[i] + b * z[i];
    }

    /// <summary>Sum of x_i y_i over two spans of equal length.</summary>
    public static double Dot(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        var i = 0;
        var sum = 0.0;
        if (Vector.IsHardwareAccelerated && x.Length >= 2 * Vector<double>.Count)
        {
            var vx = MemoryMarshal.Cast<double, Vector<double>>(x);
            var vy = MemoryMarshal.Cast<double, Vector<double>>(y);
            var acc = Vector<double>.Zero;
            for (var v = 0; v < vx.Length; v++) acc += vx[v] * vy[v];
            sum = Vector.Sum(acc);
            i = vx.Length * Vector<double>.Count;
        }
        for (; i < x.Length; i++) sum += x[i] * y[i];
        return sum;
    }
}
