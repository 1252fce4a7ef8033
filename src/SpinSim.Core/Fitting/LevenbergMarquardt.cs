// Method: J. J. Moré, "The Levenberg-Marquardt algorithm: implementation and theory", Lecture Notes in Mathematics 630 (Numerical Analysis, Dundee 1977), Springer 1978, pp. 105-116.
//
// Why not MathNet.Numerics' LevenbergMarquardtMinimizer (5.0.0, referenced): it offers no progress report and no
// cancellation, applies bounds by a change of variables (which bends the scaling and makes the covariance at or near a
// bound that of the transformed variable), and reports no null space. Run on the 27 NIST StRD nonlinear sets from both
// starts with analytic Jacobians and tolerances of 1e-15 it reached the certified values and standard deviations in
// 40 of 54 runs, but returned wrong parameters with an ordinary exit reason three times (Misra1c and Misra1d from
// start 2, MGH10 from start 1) and wrong standard errors for Hahn1, Nelson, Roszman1, MGH10 and Bennett5.
// This one is Moré's trust-region form with SVD subproblems, projection onto the bounds (an active set of parameters
// on a bound whose gradient points outwards), an honesty check before it calls anything converged (a Gauss-Newton
// step from the final point must be negligible), and up to two restarts with other scalings when that check fails.
// With analytic Jacobians it reaches all 54 NIST runs (tests/SpinSim.Tests/Fitting/NistStrdTests.cs).

namespace SpinSim.Core.Fitting;

/// <summary>Levenberg-Marquardt least squares with column scaling, box bounds, progress and cancellation.</summary>
public static class LevenbergMarquardt
{
    // Moré's constants: accept a step that achieves this fraction of the predicted reduction; shrink the trust
    // region below 0.25, stretch it above 0.75.
    private const double AcceptRatio = 1e-4;

    // The honesty check: a stationary point is one whose Gauss-Newton step moves no parameter by more than this
    // many standard errors, or by more than the relative amount below. Above both it is not a minimum yet.
    private const double StationaryStandardErrors = 1e-3;
    private const double StationaryRelativeStep = 1e-8;

    /// <summary>
    /// Minimises sum r_i(p)^2 from <paramref name="start"/> (clamped into the bounds). Never throws for a
    /// numerical failure: the result says why it stopped and whether the point is a converged minimum.
    /// </summary>
    /// <exception cref="ArgumentException">Lengths disagree with the model, or a lower bound exceeds its upper bound.</exception>
    public static LeastSquaresResult Minimise(ILeastSquaresModel model, double[] start, LeastSquaresOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(start);
        return new Run(model, start, options ?? new LeastSquaresOptions()).Execute();
    }

    private sealed class Run
    {
        private readonly ILeastSquaresModel _model;
        private readonly LeastSquaresOptions _o;
        private readonly int _m, _n;
        private readonly double[] _lower, _upper;

        private readonly double[] _x, _r, _xTrial, _rTrial, _scale;
        private readonly double[,] _jac;
        private bool _haveJacobian, _analyticJacobian;
        private double _rss;
        private int _iterations, _residualEvaluations, _jacobianEvaluations;

        public Run(ILeastSquaresModel model, double[] start, LeastSquaresOptions options)
        {
            _model = model;
            _o = options;
            _n = model.ParameterCount;
            _m = model.ResidualCount;
            if (start.Length != _n) throw new ArgumentException($"start has {start.Length} values, the model {_n} parameters", nameof(start));
            _lower = Bound(options.LowerBounds, double.NegativeInfinity, "LowerBounds");
            _upper = Bound(options.UpperBounds, double.PositiveInfinity, "UpperBounds");
            for (int j = 0; j < _n; j++)
                if (!(_lower[j] <= _upper[j])) throw new ArgumentException($"parameter {j}: lower bound {_lower[j]} is above upper bound {_upper[j]}", nameof(options));
            if (options.FiniteDifferenceSteps is { } steps && steps.Length != _n)
                throw new ArgumentException($"FiniteDifferenceSteps has {steps.Length} values, the model {_n} parameters", nameof(options));

            _x = new double[_n];
            for (int j = 0; j < _n; j++) _x[j] = Math.Clamp(start[j], _lower[j], _upper[j]);
            _r = new double[_m];
            _xTrial = new double[_n];
            _rTrial = new double[_m];
            _scale = new double[_n];
            _jac = new double[_m, _n];
        }

        private double[] Bound(double[]? given, double none, string name)
        {
            if (given is null) return Enumerable.Repeat(none, _n).ToArray();
            if (given.Length != _n) throw new ArgumentException($"{name} has {given.Length} values, the model {_n} parameters");
            return given.Select(v => double.IsNaN(v) ? none : v).ToArray();
        }

        private bool Cancelled => _o.Cancellation.IsCancellationRequested;

        public LeastSquaresResult Execute()
        {
            if (Cancelled) return Finish(StopReason.Cancelled, "cancelled before the first evaluation");
            _residualEvaluations++;
            _model.Residuals(_x, _r);
            _rss = SumOfSquares(_r);
            if (!double.IsFinite(_rss)) return Finish(StopReason.NonFinite, "the residuals at the start are not finite");
            if (_rss == 0) return FinishWithJacobian(StopReason.ZeroResidual, "every residual is zero at the start");

            var jacobianState = EvaluateJacobian();
            if (jacobianState != null) return jacobianState;

            // Moré's scaling keeps the largest column norm seen, which can hide a parameter whose column has since
            // shrunk by many orders (a saturated exponential, say) and stall far from a minimum. When the honesty
            // check catches that, start again from the best point: once with the scaling of the columns there, once
            // with unit scaling (Levenberg's original damping), whose trust region is in parameter units.
            for (int restart = 0; ; restart++)
            {
                var result = Iterate(unitScaling: restart == 2);
                if (result.Reason != StopReason.NoProgress || restart == MaxRestarts || _iterations >= _o.MaxIterations)
                    return restart == 0 ? result : result with { Message = $"{result.Message} (after {restart} restart(s) with other scalings)" };
            }
        }

        private const int MaxRestarts = 2;

        private LeastSquaresResult Iterate(bool unitScaling)
        {
            for (int j = 0; j < _n; j++) _scale[j] = unitScaling ? 1 : ColumnNorm(j) is var c && c > 0 ? c : 1;
            double xnorm = ScaledNorm(_x);
            double radius = _o.InitialTrustRadiusFactor * (xnorm > 0 ? xnorm : 1);
            bool firstStep = true;
            var free = new List<int>(_n);

            while (true)
            {
                // Gradient g = J^T r; a parameter on a bound whose descent direction points outwards stays put.
                double rnorm = Math.Sqrt(_rss), cosine = 0;
                free.Clear();
                for (int j = 0; j < _n; j++)
                {
                    double g = 0;
                    for (int i = 0; i < _m; i++) g += _jac[i, j] * _r[i];
                    // A parameter whose bounds coincide is held; one on a bound whose descent points outwards stays put.
                    if (_lower[j] == _upper[j] || (_x[j] <= _lower[j] && g > 0) || (_x[j] >= _upper[j] && g < 0)) continue;
                    free.Add(j);
                    double cn = ColumnNorm(j);
                    if (cn > 0) cosine = Math.Max(cosine, Math.Abs(g) / (cn * rnorm));
                }
                if (cosine <= _o.GradientTolerance)
                    return Judge(StopReason.GradientTolerance, $"the residuals are orthogonal to the Jacobian columns to {cosine:G3}");

                if (!unitScaling)
                    for (int j = 0; j < _n; j++) _scale[j] = Math.Max(_scale[j], ColumnNorm(j));
                var freeArray = free.ToArray();
                var svd = ScaledJacobianSvd.Decompose(_jac, _r, freeArray, _scale);
                if (_o.StopAboveCost < double.PositiveInfinity)
                {
                    double reachable = _rss;
                    foreach (var c in svd.C) reachable -= c * c;
                    if (reachable > _o.StopAboveCost)
                        return Finish(StopReason.AboveLimit, $"the local model's least sum of squares, {reachable:G4}, is above the limit {_o.StopAboveCost:G4}");
                }
                int rank = svd.RankAt(0);
                var scaledStep = new double[freeArray.Length];

                while (true)
                {
                    if (Cancelled) return Finish(StopReason.Cancelled, "cancelled; returning the best point found");
                    if (_iterations >= _o.MaxIterations)
                        return Finish(StopReason.MaxIterations, $"stopped after {_iterations} trial steps without converging");

                    double lambda = SolveDamping(svd, rank, radius, scaledStep);

                    Array.Copy(_x, _xTrial, _n);
                    for (int a = 0; a < freeArray.Length; a++)
                    {
                        int j = freeArray[a];
                        _xTrial[j] = Math.Clamp(_x[j] + scaledStep[a] / svd.Scale[a], _lower[j], _upper[j]);
                    }

                    // Everything below uses the step actually taken, after projection onto the bounds.
                    double pnorm = 0, jpNorm2 = 0, rjp = 0;
                    for (int j = 0; j < _n; j++) pnorm += Square(_scale[j] * (_xTrial[j] - _x[j]));
                    pnorm = Math.Sqrt(pnorm);
                    for (int i = 0; i < _m; i++)
                    {
                        double s = 0;
                        for (int j = 0; j < _n; j++) s += _jac[i, j] * (_xTrial[j] - _x[j]);
                        jpNorm2 += s * s;
                        rjp += _r[i] * s;
                    }
                    if (firstStep) radius = Math.Min(radius, pnorm);

                    _iterations++;
                    _residualEvaluations++;
                    _model.Residuals(_xTrial, _rTrial);
                    double rssTrial = SumOfSquares(_rTrial);

                    // Predicted and actual reductions relative to the current sum of squares; the predicted one is
                    // formed as -(2r + Jp).Jp so that it keeps its digits when it is tiny.
                    double predicted = -(2 * rjp + jpNorm2) / _rss;
                    double actual = double.IsFinite(rssTrial) && rssTrial < 100 * _rss ? 1 - rssTrial / _rss : -1;
                    double ratio = predicted > 0 ? actual / predicted : 0;

                    if (ratio <= 0.25)
                    {
                        // Moré's shrink: a quadratic fit along the step, kept within [0.1, 0.5].
                        double directional = 2 * rjp / _rss;
                        double shrink = actual >= 0 ? 0.5
                            : directional < 0 ? Math.Clamp(0.5 * directional / (directional + 0.5 * actual), 0.1, 0.5) : 0.1;
                        if (!double.IsFinite(rssTrial) || rssTrial >= 100 * _rss) shrink = 0.1;
                        radius = shrink * Math.Min(radius, pnorm / 0.1);
                    }
                    else if (lambda == 0 || ratio >= 0.75)
                    {
                        radius = 2 * pnorm;
                    }

                    bool accepted = ratio >= AcceptRatio;
                    if (accepted)
                    {
                        Array.Copy(_xTrial, _x, _n);
                        Array.Copy(_rTrial, _r, _m);
                        _rss = rssTrial;
                        _haveJacobian = false;
                        xnorm = ScaledNorm(_x);
                        firstStep = false;
                    }
                    _o.Progress?.Report(new LeastSquaresProgress(_iterations, _residualEvaluations, _rss, (double[])_x.Clone(), accepted, radius));

                    if (_rss == 0) return FinishWithJacobian(StopReason.ZeroResidual, "every residual is zero");
                    if (Math.Abs(actual) <= _o.FunctionTolerance && predicted <= _o.FunctionTolerance && 0.5 * ratio <= 1)
                        return Judge(StopReason.FunctionTolerance, $"relative reduction of the sum of squares below {_o.FunctionTolerance:G3}");
                    if (radius <= _o.StepTolerance * xnorm)
                        return Judge(StopReason.StepTolerance, $"relative step below {_o.StepTolerance:G3}");
                    // Below machine precision nothing more can be gained; the honesty check decides what that means.
                    if (Math.Abs(actual) <= Eps && predicted <= Eps && 0.5 * ratio <= 1)
                        return Judge(StopReason.FunctionTolerance, "no reduction of the sum of squares is possible at machine precision");
                    if (radius <= Eps * xnorm || radius < double.Epsilon * 1e10)
                        return Judge(StopReason.StepTolerance, "the trust region has shrunk to machine precision");

                    if (accepted)
                    {
                        var failed = EvaluateJacobian();
                        if (failed != null) return failed;
                        break;
                    }
                }
            }
        }

        private const double Eps = 2.220446049250313e-16;

        private double RankTolerance => _o.RankTolerance ?? (_analyticJacobian ? 1e-10 : 1e-7);

        /// <summary>
        /// Chooses the damping lambda so that the scaled step is about as long as the trust radius (within 10 %,
        /// Moré's tolerance), by a safeguarded Newton iteration on 1/||z(lambda)||, and writes that step.
        /// </summary>
        private static double SolveDamping(ScaledJacobianSvd svd, int rank, double radius, double[] scaledStep)
        {
            // The undamped step is taken only if it is short enough with every non-zero singular value in it: a
            // nearly flat direction then forces damping instead of being silently dropped, which would stall the
            // search with that parameter frozen.
            double gaussNewton = svd.Step(0, rank, scaledStep);
            if (gaussNewton <= 1.1 * radius) return 0;

            double low = 0, high = svd.ScaledGradientNorm() / radius, lambda = 0;
            for (int k = 0; k < 60; k++)
            {
                var (norm, derivative) = svd.StepNorm(lambda);
                double phi = norm - radius;
                if (Math.Abs(phi) <= 0.1 * radius && lambda > 0) break;
                if (phi > 0) low = Math.Max(low, lambda); else high = Math.Min(high, lambda);
                // Newton on 1/||z||, which is nearly linear in lambda (Moré 1978).
                double next = derivative < 0 ? lambda - (phi / radius) * (norm / derivative) : double.NaN;
                lambda = next > low && next < high ? next : low > 0 ? Math.Sqrt(low * high) : 0.5 * high;
            }
            if (lambda == 0) lambda = high;
            svd.Step(lambda, rank, scaledStep);
            return lambda;
        }

        /// <summary>Fills the Jacobian at the current point; returns a finished result only when it cannot.</summary>
        private LeastSquaresResult? EvaluateJacobian()
        {
            if (_model.TryJacobian(_x, _r, _jac))
            {
                _analyticJacobian = true;
            }
            else
            {
                _analyticJacobian = false;
                if (!FiniteDifferenceJacobian())
                    return Finish(StopReason.Cancelled, "cancelled while differencing; returning the best point found");
            }
            _jacobianEvaluations++;
            for (int i = 0; i < _m; i++)
                for (int j = 0; j < _n; j++)
                    if (!double.IsFinite(_jac[i, j]))
                        return Finish(StopReason.NonFinite, $"the Jacobian is not finite at the current point (residual {i}, parameter {j})");
            _haveJacobian = true;
            return null;
        }

        private bool FiniteDifferenceJacobian()
        {
            bool central = _o.FiniteDifferences == FiniteDifferenceScheme.Central;
            double relative = _o.RelativeStep ?? (central ? Math.Cbrt(Eps) : Math.Sqrt(Eps));
            var xh = (double[])_x.Clone();
            var plus = new double[_m];
            var minus = new double[_m];
            for (int j = 0; j < _n; j++)
            {
                if (Cancelled) return false;
                double h = _o.FiniteDifferenceSteps is { } steps && steps[j] != 0 ? Math.Abs(steps[j])
                    : relative * (_x[j] != 0 ? Math.Abs(_x[j]) : 1);
                double up = _x[j] + h, down = _x[j] - h;
                bool upOk = up <= _upper[j], downOk = down >= _lower[j];
                double a, b;
                if (central && upOk && downOk) (a, b) = (up, down);
                else if (upOk) (a, b) = (up, _x[j]);
                else if (downOk) (a, b) = (_x[j], down);
                else if (_upper[j] - _x[j] >= _x[j] - _lower[j]) (a, b) = (_upper[j], _x[j]); // box narrower than h
                else (a, b) = (_x[j], _lower[j]);

                // The difference of the representable arguments, not h, so rounding of x + h does not bias the slope.
                xh[j] = a;
                if (a == _x[j]) Array.Copy(_r, plus, _m); else { _model.Residuals(xh, plus); _residualEvaluations++; }
                xh[j] = b;
                if (b == _x[j]) Array.Copy(_r, minus, _m); else { _model.Residuals(xh, minus); _residualEvaluations++; }
                xh[j] = _x[j];
                double denominator = a - b;
                for (int i = 0; i < _m; i++) _jac[i, j] = denominator != 0 ? (plus[i] - minus[i]) / denominator : 0;
            }
            return true;
        }

        /// <summary>
        /// A tolerance test has fired; call it convergence only if the Gauss-Newton step from here is negligible
        /// (within 1e-3 standard errors or 1e-8 relative for every free parameter). That is what keeps a collapse of
        /// the trust region far from a minimum, or a drift along a flat valley, from being reported as an answer.
        /// </summary>
        private LeastSquaresResult Judge(StopReason reason, string message)
        {
            if (!_haveJacobian)
            {
                var failed = EvaluateJacobian();
                if (failed != null) return failed;
            }
            var stats = LinearisedStatistics.Compute(_jac, _r, AtBounds(), RankTolerance);
            for (int j = 0; j < _n; j++)
            {
                double step = Math.Abs(stats.GaussNewtonStep[j]);
                double allowed = StationaryRelativeStep * Math.Abs(_x[j]);
                if (!double.IsNaN(stats.StandardErrors[j])) allowed = Math.Max(allowed, StationaryStandardErrors * stats.StandardErrors[j]);
                if (step > allowed || double.IsNaN(step))
                    return Build(stats, false, StopReason.NoProgress,
                        $"{message}, but a Gauss-Newton step would still move parameter {j} by {step:G3} (more than {allowed:G3}): not a minimum");
            }
            return Build(stats, true, reason, message);
        }

        private LeastSquaresResult FinishWithJacobian(StopReason reason, string message)
        {
            var failed = EvaluateJacobian();
            if (failed != null) return failed;
            return Build(LinearisedStatistics.Compute(_jac, _r, AtBounds(), RankTolerance), reason == StopReason.ZeroResidual, reason, message);
        }

        private LeastSquaresResult Finish(StopReason reason, string message)
        {
            if (_haveJacobian) return Build(LinearisedStatistics.Compute(_jac, _r, AtBounds(), RankTolerance), false, reason, message);

            // No Jacobian at the returned point (cancelled while differencing, or nothing finite): no statistics.
            var nan = new double[_n, _n];
            for (int a = 0; a < _n; a++) for (int b = 0; b < _n; b++) nan[a, b] = double.NaN;
            return new LeastSquaresResult
            {
                Parameters = (double[])_x.Clone(), StandardErrors = Enumerable.Repeat(double.NaN, _n).ToArray(),
                Covariance = nan, Correlation = (double[,])nan.Clone(), ResidualSumOfSquares = _rss,
                DegreesOfFreedom = _m - _n, ResidualVariance = _m > _n ? _rss / (_m - _n) : double.NaN,
                Rank = 0, NullSpace = [], Undetermined = new bool[_n], AtBound = AtBounds(),
                Iterations = _iterations, ResidualEvaluations = _residualEvaluations, JacobianEvaluations = _jacobianEvaluations,
                Converged = false, Reason = reason, Message = message + "; no Jacobian at this point, so no standard errors",
            };
        }

        private LeastSquaresResult Build(LinearisedStatistics stats, bool converged, StopReason reason, string message) => new()
        {
            Parameters = (double[])_x.Clone(), StandardErrors = stats.StandardErrors, Covariance = stats.Covariance,
            Correlation = stats.Correlation, ResidualSumOfSquares = _rss, DegreesOfFreedom = stats.DegreesOfFreedom,
            ResidualVariance = stats.ResidualVariance, Rank = stats.Rank, NullSpace = stats.NullSpace,
            Undetermined = stats.Undetermined, AtBound = AtBounds(), Iterations = _iterations,
            ResidualEvaluations = _residualEvaluations, JacobianEvaluations = _jacobianEvaluations,
            Converged = converged, Reason = reason,
            Message = stats.NullSpace.Count > 0 ? $"{message}; {stats.NullSpace.Count} direction(s) not determined by the data" : message,
        };

        private bool[] AtBounds()
        {
            var at = new bool[_n];
            for (int j = 0; j < _n; j++) at[j] = _x[j] <= _lower[j] || _x[j] >= _upper[j];
            return at;
        }

        private double ColumnNorm(int j)
        {
            double s = 0;
            for (int i = 0; i < _m; i++) s += _jac[i, j] * _jac[i, j];
            return Math.Sqrt(s);
        }

        private double ScaledNorm(double[] x)
        {
            double s = 0;
            for (int j = 0; j < _n; j++) s += Square(_scale[j] * x[j]);
            return Math.Sqrt(s);
        }

        private static double SumOfSquares(ReadOnlySpan<double> r)
        {
            double s = 0;
            foreach (var v in r) s += v * v;
            return s;
        }

        private static double Square(double v) => v * v;
    }
}
