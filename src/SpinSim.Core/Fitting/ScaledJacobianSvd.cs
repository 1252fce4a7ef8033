// Method: Levenberg-Marquardt steps from the SVD of the scaled Jacobian, J. J. Moré, Lecture Notes in Mathematics 630, Springer 1978, pp. 105-116.

using MathNet.Numerics.LinearAlgebra;

namespace SpinSim.Core.Fitting;

/// <summary>
/// Singular value decomposition of a column-scaled Jacobian, A = J[:, free] diag(1/d) = U S V^T, kept with
/// c = U^T r. Decomposing A (rather than forming J^T J) keeps the condition number at cond(A), not its square,
/// which is what lets ill-conditioned problems reach full precision.
/// </summary>
internal sealed class ScaledJacobianSvd
{
    public required int[] Free { get; init; }

    /// <summary>Scale of each free column (its divisor in A).</summary>
    public required double[] Scale { get; init; }

    /// <summary>Singular values, largest first.</summary>
    public required double[] S { get; init; }

    /// <summary>Right singular vectors as columns, free.Length x free.Length.</summary>
    public required double[,] V { get; init; }

    /// <summary>U^T r.</summary>
    public required double[] C { get; init; }

    public static ScaledJacobianSvd Decompose(double[,] jacobian, ReadOnlySpan<double> residuals, int[] free, double[] scale)
    {
        int m = jacobian.GetLength(0), k = free.Length;
        var freeScale = free.Select(j => scale[j]).ToArray();
        if (k == 0 || m == 0)
            return new ScaledJacobianSvd { Free = free, Scale = freeScale, S = [], V = new double[k, 0], C = [] };

        Matrix<double> u, vt;
        Vector<double> s, ur;
        if (m >= k)
        {
            // Householder triangularisation first, so the SVD is of a k x k triangle and no m x m (or m x k) Q is formed.
            var (triangle, qtr) = Triangularise(jacobian, residuals, free, freeScale);
            var svd = Matrix<double>.Build.DenseOfColumnMajor(k, k, triangle).Svd(true);
            (u, s, vt) = (svd.U, svd.S, svd.VT);
            ur = u.TransposeThisAndMultiply(Vector<double>.Build.Dense(qtr));
        }
        else
        {
            var a = Matrix<double>.Build.Dense(m, k, (i, c) => jacobian[i, free[c]] / freeScale[c]);
            var svd = a.Svd(true);
            (u, s, vt) = (svd.U, svd.S, svd.VT);
            ur = u.TransposeThisAndMultiply(Vector<double>.Build.Dense(residuals.ToArray()));
        }

        // With fewer residuals than free parameters the missing singular values are zero; keeping all k right
        // singular vectors lets the caller see the whole null space.
        var v = new double[k, k];
        for (int i = 0; i < k; i++)
            for (int c = 0; c < k; c++) v[i, c] = vt[c, i];
        var sPadded = new double[k];
        var cPadded = new double[k];
        for (int c = 0; c < Math.Min(k, s.Count); c++) { sPadded[c] = s[c]; cPadded[c] = ur[c]; }
        return new ScaledJacobianSvd { Free = free, Scale = freeScale, S = sPadded, V = v, C = cPadded };
    }

    /// <summary>
    /// R (k x k, column-major, upper triangle) and the first k entries of Q^T r for A = J[:, free] diag(1/scale) = Q R
    /// (m &gt;= k), by Householder reflections applied to A and r as they are made (Golub and Van Loan, Matrix
    /// Computations, 4th ed., algorithm 5.2.1); Q itself is never formed.
    /// </summary>
    internal static (double[] R, double[] QtR) Triangularise(double[,] jacobian, ReadOnlySpan<double> residuals, int[] free, double[] freeScale)
    {
        int m = jacobian.GetLength(0), k = free.Length;
        // A column-major copy: each reflection works down whole columns.
        var a = new double[m * k];
        for (int c = 0; c < k; c++)
        {
            var column = a.AsSpan(c * m, m);
            double inverse = 1 / freeScale[c];
            int j = free[c];
            for (int i = 0; i < m; i++) column[i] = jacobian[i, j] * inverse;
        }
        var r = residuals.ToArray();
        for (int c = 0; c < k; c++)
        {
            var x = a.AsSpan(c * m + c, m - c);
            double norm = Norm(x);
            if (norm == 0) continue;
            // v = x + sign(x0) |x| e1, H = I - 2 v v^T / (v^T v); H x = -sign(x0) |x| e1.
            double alpha = x[0] >= 0 ? -norm : norm;
            x[0] -= alpha;
            double vv = Dot(x, x);
            for (int d = c + 1; d < k; d++) Reflect(x, a.AsSpan(d * m + c, m - c), vv);
            Reflect(x, r.AsSpan(c, m - c), vv);
            x[0] = alpha;
            x[1..].Clear();
        }
        var triangle = new double[k * k];
        for (int c = 0; c < k; c++)
            for (int i = 0; i <= c; i++) triangle[c * k + i] = a[c * m + i];
        return (triangle, r[..k]);
    }

    private static void Reflect(ReadOnlySpan<double> v, Span<double> y, double vv)
    {
        double f = 2 * Dot(v, y) / vv;
        for (int i = 0; i < y.Length; i++) y[i] -= f * v[i];
    }

    private static double Dot(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        double sum = 0;
        for (int i = 0; i < x.Length; i++) sum += x[i] * y[i];
        return sum;
    }

    /// <summary>Euclidean norm, scaled against overflow and underflow.</summary>
    private static double Norm(ReadOnlySpan<double> x)
    {
        double largest = 0;
        foreach (var v in x) largest = Math.Max(largest, Math.Abs(v));
        if (largest == 0) return 0;
        double sum = 0;
        foreach (var v in x) { var t = v / largest; sum += t * t; }
        return largest * Math.Sqrt(sum);
    }

    public double LargestSingularValue => S.Length == 0 ? 0 : S[0];

    /// <summary>Number of singular values above <paramref name="relativeTolerance"/> times the largest.</summary>
    public int RankAt(double relativeTolerance)
    {
        double cut = relativeTolerance * LargestSingularValue;
        return S.Count(x => x > cut && x > 0);
    }

    /// <summary>
    /// Writes the damped step p(lambda) = -(A^T A + lambda I)^-1 A^T r into <paramref name="scaledStep"/> (in the
    /// scaled variables z = d x, indexed like Free) and returns its norm. With lambda = 0 only the first
    /// <paramref name="rank"/> singular values take part, which makes it the minimum-norm Gauss-Newton step.
    /// </summary>
    public double Step(double lambda, int rank, Span<double> scaledStep)
    {
        scaledStep.Clear();
        double norm2 = 0;
        int used = lambda > 0 ? S.Length : rank;
        for (int c = 0; c < used; c++)
        {
            double t = S[c] * C[c] / (S[c] * S[c] + lambda);
            norm2 += t * t;
            for (int i = 0; i < Free.Length; i++) scaledStep[i] -= t * V[i, c];
        }
        return Math.Sqrt(norm2);
    }

    /// <summary>||z(lambda)|| and its derivative with respect to lambda, without forming z.</summary>
    public (double Norm, double Derivative) StepNorm(double lambda)
    {
        double n2 = 0, dn2 = 0;
        for (int c = 0; c < S.Length; c++)
        {
            double q = S[c] * S[c] + lambda, t = S[c] * C[c] / q;
            n2 += t * t;
            dn2 -= 2 * t * t / q;
        }
        double norm = Math.Sqrt(n2);
        return (norm, norm > 0 ? dn2 / (2 * norm) : 0);
    }

    /// <summary>||A^T r|| = ||S c||, the scaled gradient norm; lambda above it / radius makes the step shorter than radius.</summary>
    public double ScaledGradientNorm()
    {
        double g2 = 0;
        for (int c = 0; c < S.Length; c++) g2 += S[c] * S[c] * C[c] * C[c];
        return Math.Sqrt(g2);
    }
}
