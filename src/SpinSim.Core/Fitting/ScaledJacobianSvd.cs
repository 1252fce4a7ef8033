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

        var a = Matrix<double>.Build.Dense(m, k, (i, c) => jacobian[i, free[c]] / freeScale[c]);
        var r = Vector<double>.Build.Dense(residuals.ToArray());
        Matrix<double> u, vt;
        Vector<double> s, ur;
        if (m >= k)
        {
            // A thin QR first, so the SVD is of a k x k triangle and never forms an m x m U.
            var qr = a.QR(MathNet.Numerics.LinearAlgebra.Factorization.QRMethod.Thin);
            var svd = qr.R.Svd(true);
            (u, s, vt) = (svd.U, svd.S, svd.VT);
            ur = u.TransposeThisAndMultiply(qr.Q.TransposeThisAndMultiply(r));
        }
        else
        {
            var svd = a.Svd(true);
            (u, s, vt) = (svd.U, svd.S, svd.VT);
            ur = u.TransposeThisAndMultiply(r);
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
