namespace SpinSim.Core.Fitting;

/// <summary>How the minimiser differences <see cref="ILeastSquaresModel.Residuals"/> when the model gives no Jacobian.</summary>
public enum FiniteDifferenceScheme
{
    /// <summary>One extra evaluation per parameter; truncation error of order h.</summary>
    Forward,

    /// <summary>Two extra evaluations per parameter; truncation error of order h^2. One-sided next to a bound.</summary>
    Central,
}

/// <summary>
/// Settings for <see cref="LevenbergMarquardt.Minimise"/>. Tolerances are relative and dimensionless; the defaults
/// suit well-scaled problems where about 8 significant digits are wanted.
/// </summary>
public sealed record LeastSquaresOptions
{
    /// <summary>Most trial steps (each costs one residual evaluation, plus a Jacobian when accepted).</summary>
    public int MaxIterations { get; init; } = 1000;

    /// <summary>Stop when, for every free parameter, the cosine of the angle between the residual vector and that
    /// parameter's Jacobian column is at most this.</summary>
    public double GradientTolerance { get; init; } = 1e-10;

    /// <summary>Stop when the trust radius falls below this fraction of the scaled parameter norm.</summary>
    public double StepTolerance { get; init; } = 1e-10;

    /// <summary>Stop when both the actual and the predicted relative reduction of the sum of squares are at most this.</summary>
    public double FunctionTolerance { get; init; } = 1e-10;

    /// <summary>
    /// Stop (<see cref="StopReason.AboveLimit"/>) once the least sum of squares of the local Gauss-Newton model,
    /// RSS - |P r|^2 with P the projection onto the free Jacobian columns, is above this: for a caller that only needs
    /// to know whether the minimum comes near some level. Bounds can only raise that least value.
    /// </summary>
    public double StopAboveCost { get; init; } = double.PositiveInfinity;

    /// <summary>Per-parameter lower bounds (use double.NegativeInfinity for none); null for no lower bounds.</summary>
    public double[]? LowerBounds { get; init; }

    /// <summary>Per-parameter upper bounds (use double.PositiveInfinity for none); null for no upper bounds.</summary>
    public double[]? UpperBounds { get; init; }

    public FiniteDifferenceScheme FiniteDifferences { get; init; } = FiniteDifferenceScheme.Central;

    /// <summary>Difference step as a fraction of |parameter| (of 1 for a parameter at zero). Null: eps^(1/2) for
    /// forward, eps^(1/3) for central differences.</summary>
    public double? RelativeStep { get; init; }

    /// <summary>Absolute difference steps in parameter units, overriding <see cref="RelativeStep"/> where given (non-zero).</summary>
    public double[]? FiniteDifferenceSteps { get; init; }

    /// <summary>First trust radius as a multiple of the scaled norm of the start (or of 1 when that is zero).</summary>
    public double InitialTrustRadiusFactor { get; init; } = 100;

    /// <summary>
    /// A direction is "not determined" when its singular value of the column-normalised Jacobian is at most this
    /// times the largest. Null: 1e-10 for an analytic Jacobian, 1e-7 for a differenced one (whose columns carry
    /// relative errors near 1e-8 to 1e-11).
    /// </summary>
    public double? RankTolerance { get; init; }

    /// <summary>Told after every trial step, on the minimiser's thread (wrap it yourself to marshal elsewhere).</summary>
    public IProgress<LeastSquaresProgress>? Progress { get; init; }

    /// <summary>Checked before every evaluation; when cancelled the result holds the best point so far, Converged false.</summary>
    public CancellationToken Cancellation { get; init; }
}

/// <summary>State after a trial step. <see cref="Parameters"/> is a copy of the best point so far.</summary>
public sealed record LeastSquaresProgress(
    int Iteration,
    int ResidualEvaluations,
    double ResidualSumOfSquares,
    double[] Parameters,
    bool StepAccepted,
    double TrustRadius);
