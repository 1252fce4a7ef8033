namespace SpinSim.Core.Fitting;

/// <summary>Why <see cref="LevenbergMarquardt.Minimise"/> stopped. Only the first four mean convergence.</summary>
public enum StopReason
{
    /// <summary>Converged: the residual vector is (numerically) orthogonal to every free Jacobian column.</summary>
    GradientTolerance,

    /// <summary>Converged: the trust region shrank below the step tolerance and the point is stationary.</summary>
    StepTolerance,

    /// <summary>Converged: neither the last step nor the local model promises a relative reduction above the tolerance.</summary>
    FunctionTolerance,

    /// <summary>Converged: every residual is exactly zero.</summary>
    ZeroResidual,

    /// <summary>Not converged: the iteration limit was reached.</summary>
    MaxIterations,

    /// <summary>Not converged: the caller cancelled; the result is the best point found.</summary>
    Cancelled,

    /// <summary>Not converged: residuals or Jacobian at an accepted point (or at the start) were NaN or infinite.</summary>
    NonFinite,

    /// <summary>Not converged: no further reduction could be made, yet a Gauss-Newton step from the point is not negligible
    /// (for example parameters drifting towards infinity, a wrong Jacobian, or a non-smooth model).</summary>
    NoProgress,

    /// <summary>Stopped as asked: the local Gauss-Newton model put the least sum of squares within reach above the
    /// caller's <see cref="LeastSquaresOptions.StopAboveCost"/>. The point is the best one reached.</summary>
    AboveLimit,
}

/// <summary>
/// The outcome of a least-squares fit. Statistics are linearised at <see cref="Parameters"/>:
/// covariance = s^2 (J^T J)^-1 with s^2 = RSS / (n - p). Parameters held at a bound are left out of that
/// inversion (their standard error is NaN); parameters that move along a direction the data do not determine
/// have an infinite standard error, and those directions are listed in <see cref="NullSpace"/>.
/// </summary>
public sealed record LeastSquaresResult
{
    public required double[] Parameters { get; init; }

    /// <summary>sqrt of the covariance diagonal; +infinity when not determined, NaN at a bound or when n &lt;= p.</summary>
    public required double[] StandardErrors { get; init; }

    /// <summary>p x p, in parameter units squared; NaN in rows and columns of undetermined or bound parameters.</summary>
    public required double[,] Covariance { get; init; }

    public required double[,] Correlation { get; init; }

    public required double ResidualSumOfSquares { get; init; }

    /// <summary>n - p, residuals less parameters (all of them, bound or not).</summary>
    public required int DegreesOfFreedom { get; init; }

    /// <summary>n, the residuals the sum of squares ran over.</summary>
    public int Points => DegreesOfFreedom + Parameters.Length;

    /// <summary>s^2 = RSS / (n - p); NaN when n &lt;= p.</summary>
    public required double ResidualVariance { get; init; }

    /// <summary>Numerical rank of the column-normalised Jacobian over the parameters not at a bound.</summary>
    public required int Rank { get; init; }

    /// <summary>Unit directions in parameter space along which the residuals do not change (to the rank tolerance):
    /// J d = 0. Empty when every free parameter is determined.</summary>
    public required IReadOnlyList<double[]> NullSpace { get; init; }

    /// <summary>True for each parameter with a share in a <see cref="NullSpace"/> direction.</summary>
    public required bool[] Undetermined { get; init; }

    /// <summary>True for each parameter that ended on its lower or upper bound.</summary>
    public required bool[] AtBound { get; init; }

    /// <summary>Trial steps taken.</summary>
    public required int Iterations { get; init; }

    /// <summary>Residual evaluations, including those spent on finite differences.</summary>
    public required int ResidualEvaluations { get; init; }

    public required int JacobianEvaluations { get; init; }

    public required bool Converged { get; init; }

    public required StopReason Reason { get; init; }

    /// <summary>One sentence on why it stopped, for people.</summary>
    public required string Message { get; init; }
}
