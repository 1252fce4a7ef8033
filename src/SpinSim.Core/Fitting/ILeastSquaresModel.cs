namespace SpinSim.Core.Fitting;

/// <summary>
/// A problem for <see cref="LevenbergMarquardt"/>: minimise the sum of squares of <see cref="ResidualCount"/>
/// residuals over <see cref="ParameterCount"/> parameters. The minimiser knows nothing of what the parameters mean;
/// weighting, if any, is the model's business (return w_i (model_i - data_i)).
/// </summary>
public interface ILeastSquaresModel
{
    int ParameterCount { get; }

    int ResidualCount { get; }

    /// <summary>Writes the residuals at <paramref name="parameters"/> into <paramref name="residuals"/>
    /// (conventionally model minus data). A non-finite residual marks the point as unusable; it does not throw.</summary>
    void Residuals(ReadOnlySpan<double> parameters, Span<double> residuals);

    /// <summary>
    /// Writes the analytic Jacobian d residual_i / d parameter_j into <paramref name="jacobian"/>
    /// (<see cref="ResidualCount"/> x <see cref="ParameterCount"/>) and returns true, or returns false to have
    /// the minimiser difference <see cref="Residuals"/>. <paramref name="residuals"/> are those at
    /// <paramref name="parameters"/>, given so that a model can reuse work.
    /// </summary>
    bool TryJacobian(ReadOnlySpan<double> parameters, ReadOnlySpan<double> residuals, double[,] jacobian) => false;
}
