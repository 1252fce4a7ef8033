// Method: H. R. Künsch, "The jackknife and the bootstrap for general stationary observations", Annals of Statistics 17, 1217-1241 (1989): the moving-block bootstrap.
using MathNet.Numerics.Statistics;
using SpinSim.Core.Engine;
using SpinSim.Core.Traces;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>How to run the residual bootstrap.</summary>
/// <param name="Replicates">Number of refits to resampled data.</param>
/// <param name="BlockPoints">Length of the resampled blocks in fitted points; null to take it from the residuals' autocorrelation.</param>
public sealed record BootstrapOptions(int Replicates = 100, int? BlockPoints = null, int Seed = 1, IProgress<int>? Progress = null,
    CancellationToken Cancel = default, EngineOptions? Engine = null);

/// <summary>
/// The outcome: standard deviation of each parameter over the replicates (NaN for fixed parameters, in the order of
/// <see cref="SpectrumFitResult.Parameters"/>), how many replicates were refitted and converged, and the block length.
/// </summary>
public sealed record BootstrapResult(int Replicates, int Converged, int BlockPoints, IReadOnlyList<double> StdErrors);

/// <summary>
/// Standard errors that do not assume independent points: the fitted model plus residuals resampled in blocks of
/// neighbouring points (so that the correlation the lineshape and the filters put between neighbours survives), refitted
/// from the best point, many times; the scatter of the refitted values is the bootstrap standard error. Where the
/// points are truly independent it agrees with the covariance estimate; where they are correlated it is larger.
/// </summary>
public static class SpectrumBootstrap
{
    /// <summary>
    /// The block covers this many correlation lengths L of the residuals (the lag where their autocorrelation falls
    /// below 1/e). Blocks cut the correlations across their ends: for a Gaussian-shaped autocorrelation the variance is
    /// then low by about L / (block sqrt(pi)), 11 % at five lengths.
    /// </summary>
    public const double BlocksPerCorrelationLength = 5;

    public static BootstrapResult Run(SpectrumFitProblem problem, SpectrumFitResult fit, BootstrapOptions? options = null)
    {
        options ??= new BootstrapOptions();
        if (options.Replicates < 2) throw new ArgumentException($"a bootstrap needs at least 2 replicates, not {options.Replicates}");
        if (fit.Traces.Count != problem.Data.Count) throw new ArgumentException("the fit result does not belong to this problem");
        var residuals = fit.Traces.Select(t => Centred(t.Residual)).ToArray();
        var block = options.BlockPoints ?? residuals.Max(BlockLength);
        if (block < 1) throw new ArgumentException($"the block length must be at least 1 point, not {block}");

        // Every replicate starts at the best point, with one start and no continuation: it only has to follow the
        // optimum as the data move by noise.
        var best = problem.Parameters.Select((p, i) => p with { Start = Math.Clamp(fit.Parameters[i].Value, p.Lower, p.Upper) }).ToArray();
        var estimates = new double[options.Replicates][];
        var converged = new bool[options.Replicates];
        var done = 0;
        Parallel.For(0, options.Replicates, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount, CancellationToken = options.Cancel }, r =>
        {
            // A seed per replicate, the same in every run (HashCode is salted per process, so not that).
            var random = new Random(unchecked(options.Seed * 1_000_003 + r));
            var data = problem.Data.Select((d, k) =>
            {
                var t = fit.Traces[k];
                var resampled = Resample(residuals[k], Segments(t.Measured.ShiftPpm), block, random);
                // residual = model - data, so data* = model - residual*.
                var y = t.Model.Select((m, i) => m - resampled[i]).ToArray();
                var trace = new SpectrumTrace(t.Measured.ShiftPpm.ToArray(), y, t.Measured.ObserveMHz, t.Measured.Nucleus,
                    TraceOrigin.Describe("block-bootstrap replicate"));
                return d with { Trace = trace };
            }).ToArray();
            var replicate = problem with { System = fit.FittedSystem, Data = data, Parameters = best };
            var result = SpectrumFitter.Fit(replicate, new SpectrumFitOptions(Starts: 1, Continuation: false, Engine: options.Engine, Cancel: options.Cancel));
            estimates[r] = result.Parameters.Select(p => p.Value).ToArray();
            converged[r] = result.Converged;
            options.Progress?.Report(Interlocked.Increment(ref done));
        });

        var used = Enumerable.Range(0, options.Replicates).Where(r => converged[r]).ToArray();
        // Sample standard deviation (n - 1) over the converged replicates.
        var errors = fit.Parameters.Select((p, i) => !p.Varied || used.Length < 2 ? double.NaN : used.Select(r => estimates[r][i]).StandardDeviation()).ToArray();
        return new BootstrapResult(options.Replicates, used.Length, block, errors);
    }

    /// <summary>
    /// Block length from the residuals: <see cref="BlocksPerCorrelationLength"/> times the first lag at which their
    /// sample autocorrelation drops below 1/e, at most a tenth of the points.
    /// </summary>
    public static int BlockLength(double[] residuals)
    {
        var n = residuals.Length;
        var variance = residuals.Sum(r => r * r);
        if (n < 4 || variance == 0) return 1;
        var lag = 1;
        for (; lag < n / 2; lag++)
        {
            double sum = 0;
            for (var i = 0; i + lag < n; i++) sum += residuals[i] * residuals[i + lag];
            if (sum / variance < 1 / Math.E) break;
        }
        return Math.Clamp((int)Math.Ceiling(BlocksPerCorrelationLength * lag), 1, Math.Max(1, n / 10));
    }

    /// <summary>
    /// The contiguous runs of fitted points, as [start, end) index pairs: a new run begins where the step to the next
    /// point exceeds 1.5 times the median step (a gap between regions or an excluded interval).
    /// </summary>
    internal static IReadOnlyList<(int Start, int End)> Segments(IReadOnlyList<double> ppm)
    {
        var n = ppm.Count;
        if (n < 3) return [(0, n)];
        var steps = Enumerable.Range(1, n - 1).Select(i => Math.Abs(ppm[i] - ppm[i - 1])).ToArray();
        var median = steps.Order().ElementAt(steps.Length / 2);
        var segments = new List<(int, int)>();
        var start = 0;
        for (var i = 1; i < n; i++)
            if (steps[i - 1] > 1.5 * median) { segments.Add((start, i)); start = i; }
        segments.Add((start, n));
        return segments;
    }

    /// <summary>
    /// A series of the same length in which each contiguous run is refilled with blocks of <paramref name="block"/>
    /// consecutive values (shorter where the run is) drawn from random places in the same run, so that no block spans a
    /// gap and every region keeps its own noise.
    /// </summary>
    internal static double[] Resample(double[] series, IReadOnlyList<(int Start, int End)> segments, int block, Random random)
    {
        var result = new double[series.Length];
        foreach (var (start, end) in segments)
        {
            var length = end - start;
            var size = Math.Min(block, length);
            var filled = start;
            while (filled < end)
            {
                var from = start + random.Next(0, length - size + 1);
                for (var k = 0; k < size && filled < end; k++) result[filled++] = series[from + k];
            }
        }
        return result;
    }

    private static double[] Centred(double[] values)
    {
        var mean = values.Average();
        return values.Select(v => v - mean).ToArray();
    }
}
