// Iterative polynomial baseline (points above the fit are clipped to it and the fit repeated): C. A. Lieber, A. Mahadevan-Jansen, Appl. Spectrosc. 57, 1363 (2003).
using MathNet.Numerics;

namespace SpinSim.Core.Processing;

/// <summary>
/// Removes a smooth baseline from a phased spectrum: a polynomial is fitted by least squares, every point above it is
/// lowered to it, and the fit is repeated until it stops changing; the lines never pull the baseline up.
/// </summary>
public static class PolynomialBaseline
{
    public const int MaxIterations = 50;

    /// <summary>The baseline under <paramref name="y"/> as a new array (the axis is the point index scaled to -1..1).</summary>
    public static double[] Fit(ReadOnlySpan<double> y, int order)
    {
        var n = y.Length;
        var x = new double[n];
        for (var i = 0; i < n; i++) x[i] = n == 1 ? 0 : 2.0 * i / (n - 1) - 1;
        var work = y.ToArray();
        var baseline = new double[n];
        var scale = 0.0;
        foreach (var v in y) scale = Math.Max(scale, Math.Abs(v));
        for (var iteration = 0; iteration < MaxIterations; iteration++)
        {
            var coefficients = MathNet.Numerics.Fit.Polynomial(x, work, order);
            var change = 0.0;
            for (var i = 0; i < n; i++)
            {
                baseline[i] = Polynomial.Evaluate(x[i], coefficients);
                if (work[i] > baseline[i])
                {
                    change = Math.Max(change, work[i] - baseline[i]);
                    work[i] = baseline[i];
                }
            }
            if (change <= 1e-6 * scale) break;
        }
        return baseline;
    }
}
