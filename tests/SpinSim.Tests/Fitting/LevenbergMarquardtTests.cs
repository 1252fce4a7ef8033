using SpinSim.Core.Fitting;

namespace SpinSim.Tests.Fitting;

public class LevenbergMarquardtTests
{
    // Straight-line data with a fixed, deterministic scatter so that s^2 > 0.
    private static readonly double[] LineX = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9];
    private static readonly double[] LineY = LineX.Select((x, i) => 1 + 2 * x + 0.1 * Math.Sin(3.7 * i)).ToArray();

    /// <summary>y = f(p, x) - data with an optional analytic Jacobian; records every parameter vector it is given.</summary>
    private sealed class Model(int parameters, double[] x, double[] y,
        Func<double[], double, double> f, Func<double[], double, double[]>? gradient = null) : ILeastSquaresModel
    {
        public List<double[]> Seen { get; } = [];
        public Action<int>? OnEvaluation { get; init; }
        public int ParameterCount => parameters;
        public int ResidualCount => y.Length;

        public void Residuals(ReadOnlySpan<double> p, Span<double> r)
        {
            var copy = p.ToArray();
            Seen.Add(copy);
            OnEvaluation?.Invoke(Seen.Count);
            for (int i = 0; i < y.Length; i++) r[i] = f(copy, x[i]) - y[i];
        }

        public bool TryJacobian(ReadOnlySpan<double> p, ReadOnlySpan<double> r, double[,] jac)
        {
            if (gradient is null) return false;
            var copy = p.ToArray();
            for (int i = 0; i < y.Length; i++)
            {
                var g = gradient(copy, x[i]);
                for (int j = 0; j < g.Length; j++) jac[i, j] = g[j];
            }
            return true;
        }
    }

    private static Model Line(bool analytic) =>
        new(2, LineX, LineY, (p, x) => p[0] + p[1] * x, analytic ? (p, x) => [1, x] : null);

    private static (double Intercept, double Slope, double InterceptSe, double SlopeSe) OrdinaryLeastSquares()
    {
        // Closed-form simple linear regression (textbook formulas, e.g. N. R. Draper and H. Smith,
        // Applied Regression Analysis, 3rd ed., Wiley 1998, ch. 1; quoted from memory).
        int n = LineX.Length;
        double mx = LineX.Average(), my = LineY.Average();
        double sxx = LineX.Sum(x => (x - mx) * (x - mx)), sxy = LineX.Zip(LineY, (x, y) => (x - mx) * (y - my)).Sum();
        double slope = sxy / sxx, intercept = my - slope * mx;
        double rss = LineX.Zip(LineY, (x, y) => Math.Pow(y - intercept - slope * x, 2)).Sum(), s2 = rss / (n - 2);
        return (intercept, slope, Math.Sqrt(s2 * (1.0 / n + mx * mx / sxx)), Math.Sqrt(s2 / sxx));
    }

    /// <summary>
    /// For a model linear in its parameters the Gauss-Newton model is exact, so its least sum of squares is the closed-form
    /// minimum (Draper and Smith, ch. 1): a limit below it stops the minimiser before its first step, a limit above it
    /// changes nothing.
    /// </summary>
    [Theory]
    [InlineData(0.5, true)]
    [InlineData(2.0, false)]
    public void A_cost_limit_stops_only_when_the_local_model_cannot_reach_it(double limitOverMinimum, bool stops)
    {
        var ols = OrdinaryLeastSquares();
        var minimum = LineX.Zip(LineY, (x, y) => Math.Pow(y - ols.Intercept - ols.Slope * x, 2)).Sum();
        var result = LevenbergMarquardt.Minimise(Line(true), [0, 0], new LeastSquaresOptions { StopAboveCost = limitOverMinimum * minimum });
        if (stops)
        {
            Assert.Equal(StopReason.AboveLimit, result.Reason);
            Assert.False(result.Converged);
            Assert.Equal(0, result.Iterations);
            return;
        }
        Assert.True(result.Converged, result.Message);
        Assert.Equal(minimum, result.ResidualSumOfSquares, 1e-12);
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void StraightLineMatchesTheClosedFormWithStandardErrors(bool analytic)
    {
        var result = LevenbergMarquardt.Minimise(Line(analytic), [0, 0]);
        var ols = OrdinaryLeastSquares();
        Assert.True(result.Converged, result.Message);
        // Closed-form ordinary least squares (Draper and Smith, ch. 1).
        Assert.Equal(ols.Intercept, result.Parameters[0], 1e-9);
        Assert.Equal(ols.Slope, result.Parameters[1], 1e-9);
        Assert.Equal(ols.InterceptSe, result.StandardErrors[0], 1e-7);
        Assert.Equal(ols.SlopeSe, result.StandardErrors[1], 1e-7);
        Assert.Equal(8, result.DegreesOfFreedom);
        Assert.Equal(2, result.Rank);
        Assert.Empty(result.NullSpace);
        Assert.Equal(1.0, result.Correlation[0, 0]);
        Assert.InRange(result.Correlation[0, 1], -1, 0); // intercept and slope anticorrelate for x > 0
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void UpperBoundIsRespectedAndReported(bool analytic)
    {
        var model = Line(analytic);
        var options = new LeastSquaresOptions { LowerBounds = [double.NegativeInfinity, 0], UpperBounds = [double.PositiveInfinity, 1.5] };
        var result = LevenbergMarquardt.Minimise(model, [0, 1], options);

        Assert.True(result.Converged, result.Message);
        Assert.Equal(1.5, result.Parameters[1]);
        // With the slope held at 1.5 the best intercept is mean(y - 1.5 x): the ordinary mean.
        Assert.Equal(LineY.Average() - 1.5 * LineX.Average(), result.Parameters[0], 1e-9);
        Assert.Equal([false, true], result.AtBound);
        Assert.True(double.IsNaN(result.StandardErrors[1]));
        Assert.True(double.IsFinite(result.StandardErrors[0]));
        // Not one evaluation, differencing included, left the box.
        Assert.All(model.Seen, p => Assert.InRange(p[1], 0, 1.5));
    }

    [Fact]
    public void DifferencingInABoxNarrowerThanTheStepStaysInside()
    {
        var model = Line(analytic: false);
        var options = new LeastSquaresOptions { LowerBounds = [double.NegativeInfinity, 1.5 - 1e-9], UpperBounds = [double.PositiveInfinity, 1.5] };
        var result = LevenbergMarquardt.Minimise(model, [0, 1.5], options);
        Assert.True(result.Converged, result.Message);
        Assert.Equal(LineY.Average() - 1.5 * LineX.Average(), result.Parameters[0], 1e-7);
        Assert.True(result.AtBound[1]);
        Assert.All(model.Seen, p => Assert.InRange(p[1], 1.5 - 1e-9, 1.5));
    }

    [Fact]
    public void InactiveBoundsChangeNothing()
    {
        var free = LevenbergMarquardt.Minimise(Line(true), [0, 0]);
        var boxed = LevenbergMarquardt.Minimise(Line(true), [0, 0], new LeastSquaresOptions { LowerBounds = [-10, -10], UpperBounds = [10, 10] });
        Assert.True(boxed.Converged, boxed.Message);
        Assert.Equal([false, false], boxed.AtBound);
        Assert.Equal(free.Parameters[0], boxed.Parameters[0], 1e-10);
        Assert.Equal(free.StandardErrors[1], boxed.StandardErrors[1], 1e-10);
    }

    [Fact]
    public void StartOutsideTheBoxIsClampedIntoIt()
    {
        var model = Line(true);
        var result = LevenbergMarquardt.Minimise(model, [0, 5], new LeastSquaresOptions { UpperBounds = [10, 1.5] });
        Assert.Equal([0.0, 1.5], model.Seen[0]);
        Assert.Equal(1.5, result.Parameters[1]);
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void ParametersEnteringOnlyAsASumReportTheNullDirection(bool analytic)
    {
        // y = (a + b) x + c: the data fix a + b and c, never a - b.
        var model = new Model(3, LineX, LineY, (p, x) => (p[0] + p[1]) * x + p[2], analytic ? (p, x) => [x, x, 1] : null);
        var result = LevenbergMarquardt.Minimise(model, [0.3, 0.7, 0]);
        var ols = OrdinaryLeastSquares();

        Assert.True(result.Converged, result.Message);
        Assert.Equal(2, result.Rank);
        var direction = Assert.Single(result.NullSpace);
        Assert.Equal(1 / Math.Sqrt(2), direction[0], 1e-6);
        Assert.Equal(-1 / Math.Sqrt(2), direction[1], 1e-6);
        Assert.Equal(0, direction[2], 1e-6);
        Assert.Equal([true, true, false], result.Undetermined);
        Assert.Equal(double.PositiveInfinity, result.StandardErrors[0]);
        Assert.Equal(double.PositiveInfinity, result.StandardErrors[1]);
        Assert.True(double.IsNaN(result.Covariance[0, 2]));
        // What is determined matches the closed form (Draper and Smith, ch. 1), with s^2 = RSS / (n - 3).
        Assert.Equal(ols.Slope, result.Parameters[0] + result.Parameters[1], 1e-8);
        Assert.Equal(ols.Intercept, result.Parameters[2], 1e-8);
        Assert.Equal(ols.InterceptSe * Math.Sqrt(8.0 / 7.0), result.StandardErrors[2], 1e-6);
        Assert.Contains("not determined", result.Message);
    }

    [Fact]
    public void FewerResidualsThanParametersIsRankDeficientNotAnError()
    {
        var model = new Model(2, [0], [3], (p, _) => p[0] + p[1], (p, _) => [1, 1]);
        var result = LevenbergMarquardt.Minimise(model, [0, 0]);
        Assert.True(result.Converged, result.Message);
        Assert.Equal(3, result.Parameters[0] + result.Parameters[1], 1e-12);
        Assert.Single(result.NullSpace);
        Assert.All(result.StandardErrors, se => Assert.False(double.IsFinite(se)));
    }

    // The Rosenbrock valley as residuals: r1 = 10 (x2 - x1^2), r2 = 1 - x1, minimum at (1, 1), RSS 0.
    private static Model Rosenbrock(bool wrongJacobian = false) => new(2, [0, 1], [0, 0],
        (p, i) => i == 0 ? 10 * (p[1] - p[0] * p[0]) : 1 - p[0],
        (p, i) => i == 0 ? [wrongJacobian ? 20 * p[0] : -20 * p[0], 10] : [-1, 0]);

    [Fact]
    public void RosenbrockValleyReachesItsMinimum()
    {
        var result = LevenbergMarquardt.Minimise(Rosenbrock(), [-1.2, 1]);
        Assert.True(result.Converged, result.Message);
        Assert.Equal(1, result.Parameters[0], 1e-8);
        Assert.Equal(1, result.Parameters[1], 1e-8);
    }

    [Fact]
    public void CancellationReturnsTheBestPointSoFarUnconverged()
    {
        using var cts = new CancellationTokenSource();
        var model = new Model(2, [0, 1], [0, 0],
            (p, i) => i == 0 ? 10 * (p[1] - p[0] * p[0]) : 1 - p[0], (p, i) => i == 0 ? [-20 * p[0], 10] : [-1, 0])
        { OnEvaluation = count => { if (count == 6) cts.Cancel(); } };
        var result = LevenbergMarquardt.Minimise(model, [-1.2, 1], new LeastSquaresOptions { Cancellation = cts.Token });

        Assert.False(result.Converged);
        Assert.Equal(StopReason.Cancelled, result.Reason);
        Assert.Equal(6, model.Seen.Count);
        double Rss(double[] p) => Math.Pow(10 * (p[1] - p[0] * p[0]), 2) + Math.Pow(1 - p[0], 2);
        Assert.Equal(model.Seen.Min(Rss), result.ResidualSumOfSquares, 1e-12);
        Assert.Equal(Rss(result.Parameters), result.ResidualSumOfSquares, 1e-12);
        Assert.True(result.ResidualSumOfSquares < Rss([-1.2, 1]));
    }

    [Fact]
    public void CancelledBeforeStartReturnsTheStart()
    {
        var result = LevenbergMarquardt.Minimise(Line(true), [0.5, 0.5], new LeastSquaresOptions { Cancellation = new CancellationToken(true) });
        Assert.False(result.Converged);
        Assert.Equal(StopReason.Cancelled, result.Reason);
        Assert.Equal([0.5, 0.5], result.Parameters);
    }

    private sealed class Recorder : IProgress<LeastSquaresProgress>
    {
        public List<LeastSquaresProgress> Reports { get; } = [];
        public void Report(LeastSquaresProgress value) => Reports.Add(value);
    }

    [Fact]
    public void ProgressReportsEveryTrialWithTheBestCostSoFar()
    {
        var recorder = new Recorder();
        var result = LevenbergMarquardt.Minimise(Rosenbrock(), [-1.2, 1], new LeastSquaresOptions { Progress = recorder });
        Assert.Equal(result.Iterations, recorder.Reports.Count);
        Assert.Equal(Enumerable.Range(1, recorder.Reports.Count), recorder.Reports.Select(r => r.Iteration));
        for (int k = 1; k < recorder.Reports.Count; k++)
            Assert.True(recorder.Reports[k].ResidualSumOfSquares <= recorder.Reports[k - 1].ResidualSumOfSquares);
        Assert.Equal(result.ResidualSumOfSquares, recorder.Reports[^1].ResidualSumOfSquares);
    }

    [Fact]
    public void IterationLimitIsNotConvergence()
    {
        var result = LevenbergMarquardt.Minimise(Rosenbrock(), [-1.2, 1], new LeastSquaresOptions { MaxIterations = 3 });
        Assert.False(result.Converged);
        Assert.Equal(StopReason.MaxIterations, result.Reason);
        Assert.Equal(3, result.Iterations);
    }

    [Fact]
    public void WrongJacobianIsNotReportedAsConverged()
    {
        var result = LevenbergMarquardt.Minimise(Rosenbrock(wrongJacobian: true), [-1.2, 1]);
        Assert.False(result.Converged, result.Message);
        Assert.Equal(StopReason.NoProgress, result.Reason);
    }

    [Fact]
    public void NonFiniteStartIsReportedNotThrown()
    {
        var model = new Model(1, [1, 2], [1, 2], (p, x) => Math.Sqrt(p[0]) * x);
        var result = LevenbergMarquardt.Minimise(model, [-1]);
        Assert.False(result.Converged);
        Assert.Equal(StopReason.NonFinite, result.Reason);
    }

    [Fact]
    public void StepsIntoNonFiniteResidualsAreRejectedNotFatal()
    {
        // y = sqrt(p) x is NaN for p < 0; a long first step overshoots there and must simply be shortened.
        var model = new Model(1, [1, 2, 3], [0.1, 0.2, 0.3], (p, x) => Math.Sqrt(p[0]) * x, (p, x) => [x / (2 * Math.Sqrt(p[0]))]);
        var result = LevenbergMarquardt.Minimise(model, [4]);
        Assert.True(result.Converged, result.Message);
        Assert.Equal(0.01, result.Parameters[0], 1e-9);
    }

    [Fact]
    public void MismatchedLengthsAndCrossedBoundsAreArgumentErrors()
    {
        Assert.Throws<ArgumentException>(() => LevenbergMarquardt.Minimise(Line(true), [0]));
        Assert.Throws<ArgumentException>(() => LevenbergMarquardt.Minimise(Line(true), [0, 0], new LeastSquaresOptions { LowerBounds = [1, 1], UpperBounds = [0, 2] }));
        Assert.Throws<ArgumentException>(() => LevenbergMarquardt.Minimise(Line(true), [0, 0], new LeastSquaresOptions { UpperBounds = [1] }));
    }
}
