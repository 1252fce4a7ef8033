// Method: covariance and null space from the SVD pseudo-inverse, rank-deficient least squares as in G. H. Golub and C. F. Van Loan, Matrix Computations, 4th ed., Johns Hopkins 2013, sec. 5.5 (cited from memory).

namespace SpinSim.Core.Fitting;

/// <summary>
/// Covariance s^2 (J^T J)^+ at a fitted point, from the SVD of the column-normalised Jacobian over the parameters
/// not held at a bound. Singular values under the rank tolerance are dropped from the pseudo-inverse and their
/// directions reported, because a pseudo-inverse alone would print finite, meaningless errors for them.
/// </summary>
internal sealed class LinearisedStatistics
{
    // A parameter whose share of a unit null direction (in normalised columns) is below this is still determined.
    private const double NullShareThreshold = 1e-5;

    public required double[] StandardErrors { get; init; }
    public required double[,] Covariance { get; init; }
    public required double[,] Correlation { get; init; }
    public required int DegreesOfFreedom { get; init; }
    public required double ResidualVariance { get; init; }
    public required int Rank { get; init; }
    public required IReadOnlyList<double[]> NullSpace { get; init; }
    public required bool[] Undetermined { get; init; }

    /// <summary>Minimum-norm Gauss-Newton step from the point (zero for bound parameters), in parameter units.</summary>
    public required double[] GaussNewtonStep { get; init; }

    public static LinearisedStatistics Compute(double[,] jacobian, ReadOnlySpan<double> residuals, bool[] atBound, double rankTolerance)
    {
        int m = jacobian.GetLength(0), p = jacobian.GetLength(1);
        double rss = 0;
        foreach (var v in residuals) rss += v * v;
        int dof = m - p;
        double s2 = dof > 0 ? rss / dof : double.NaN;

        var columnNorm = new double[p];
        for (int j = 0; j < p; j++)
        {
            double sum = 0;
            for (int i = 0; i < m; i++) sum += jacobian[i, j] * jacobian[i, j];
            columnNorm[j] = Math.Sqrt(sum);
        }

        // A zero column is its own null direction; keep it out of the SVD so the scaling stays finite.
        var free = Enumerable.Range(0, p).Where(j => !atBound[j] && columnNorm[j] > 0).ToArray();
        var svd = ScaledJacobianSvd.Decompose(jacobian, residuals, free, columnNorm);
        int rank = svd.RankAt(rankTolerance);

        var undetermined = new bool[p];
        var nullSpace = new List<double[]>();
        for (int j = 0; j < p; j++)
        {
            if (atBound[j] || columnNorm[j] > 0) continue;
            undetermined[j] = true;
            var direction = new double[p];
            direction[j] = 1;
            nullSpace.Add(direction);
        }
        for (int c = rank; c < free.Length; c++)
        {
            var direction = new double[p];
            double norm2 = 0;
            for (int i = 0; i < free.Length; i++)
            {
                if (Math.Abs(svd.V[i, c]) > NullShareThreshold) undetermined[free[i]] = true;
                direction[free[i]] = svd.V[i, c] / svd.Scale[i];
                norm2 += direction[free[i]] * direction[free[i]];
            }
            // A direction has no sign; fix it so that its first clearly non-zero component is positive, which
            // makes results reproducible for callers that print them.
            double norm = Math.Sqrt(norm2);
            int first = 0;
            while (first < p - 1 && Math.Abs(direction[first]) <= 1e-8 * norm) first++;
            double sign = direction[first] < 0 ? -1 : 1;
            for (int j = 0; j < p; j++) direction[j] *= sign / norm;
            nullSpace.Add(direction);
        }

        var covariance = new double[p, p];
        var gnStep = new double[p];
        Span<double> scaledStep = stackalloc double[free.Length];
        svd.Step(0, rank, scaledStep);
        for (int a = 0; a < free.Length; a++) gnStep[free[a]] = scaledStep[a] / svd.Scale[a];

        for (int a = 0; a < p; a++)
            for (int b = 0; b < p; b++) covariance[a, b] = double.NaN;
        for (int a = 0; a < free.Length; a++)
        {
            for (int b = 0; b < free.Length; b++)
            {
                int ja = free[a], jb = free[b];
                if (undetermined[ja] || undetermined[jb]) continue;
                double sum = 0;
                for (int c = 0; c < rank; c++) sum += svd.V[a, c] * svd.V[b, c] / (svd.S[c] * svd.S[c]);
                covariance[ja, jb] = s2 * sum / (svd.Scale[a] * svd.Scale[b]);
            }
        }

        var standardErrors = new double[p];
        for (int j = 0; j < p; j++)
            standardErrors[j] = atBound[j] ? double.NaN : undetermined[j] ? double.PositiveInfinity : Math.Sqrt(covariance[j, j]);

        var correlation = new double[p, p];
        for (int a = 0; a < p; a++)
            for (int b = 0; b < p; b++)
                correlation[a, b] = a == b && !double.IsNaN(covariance[a, a]) ? 1
                    : covariance[a, b] / Math.Sqrt(covariance[a, a] * covariance[b, b]);

        return new LinearisedStatistics
        {
            StandardErrors = standardErrors, Covariance = covariance, Correlation = correlation,
            DegreesOfFreedom = dof, ResidualVariance = s2, Rank = rank, NullSpace = nullSpace,
            Undetermined = undetermined, GaussNewtonStep = gnStep,
        };
    }
}
