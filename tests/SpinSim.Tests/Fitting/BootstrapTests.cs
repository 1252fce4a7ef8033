using MathNet.Numerics.Statistics;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Traces;

namespace SpinSim.Tests.Fitting;

/// <summary>
/// The moving-block residual bootstrap (H. R. Künsch, Ann. Stat. 17, 1217, 1989) against the reference that defines a
/// standard error: the scatter of fitted values over independent noise draws. Invented ABX values, synthetic traces.
/// </summary>
public class BootstrapTests
{
    private const int Draws = 40;
    private const int Replicates = 40;

    /// <summary>Noise whose neighbouring points are correlated: white noise smoothed by a Gaussian of <paramref name="sigmaPoints"/> points, rescaled to standard deviation <paramref name="sd"/>.</summary>
    private static double[] CorrelatedNoise(int n, double sd, double sigmaPoints, int seed)
    {
        var white = new double[n];
        NoiseGenerator.AddGaussian(white, 1, seed);
        if (sigmaPoints <= 0) return white.Select(v => v * sd).ToArray();
        var half = (int)Math.Ceiling(4 * sigmaPoints);
        var kernel = Enumerable.Range(-half, 2 * half + 1).Select(k => Math.Exp(-0.5 * k * k / (sigmaPoints * sigmaPoints))).ToArray();
        var norm = Math.Sqrt(kernel.Sum(k => k * k));
        var smooth = new double[n];
        for (var i = 0; i < n; i++)
            for (var k = -half; k <= half; k++)
                if (i + k >= 0 && i + k < n) smooth[i] += kernel[k + half] * white[i + k];
        return smooth.Select(v => v / norm * sd).ToArray();
    }

    private static (SpectrumFitProblem Problem, SpectrumFitResult Fit) FitDraw(double sigmaPoints, int seed)
    {
        var truth = SpectrumFitTestData.Abx();
        var clean = SpectrumFitTestData.Synthetic(truth, 0.8, 8192, 0, 0);
        var noise = CorrelatedNoise(clean.Count, 0.01 * clean.Intensity.Max(), sigmaPoints, seed);
        var trace = new SpectrumTrace(clean.ShiftPpm.ToArray(), clean.Intensity.Select((v, i) => v + noise[i]).ToArray(), clean.ObserveMHz, "1H",
            TraceOrigin.Describe("synthetic test trace (invented values)"));
        var problem = SpectrumFitTestData.Problem(truth, trace, new FitSetup(), 0.8);
        return (problem, SpectrumFitter.Fit(problem, new SpectrumFitOptions(Starts: 1, Continuation: false)));
    }

    private static double[] ScatterOverDraws(double sigmaPoints)
    {
        var values = Enumerable.Range(0, Draws).AsParallel().Select(s => FitDraw(sigmaPoints, 1000 + s).Fit.Parameters.Select(p => p.Value).ToArray()).ToArray();
        return Enumerable.Range(0, values[0].Length).Select(i => values.Select(v => v[i]).StandardDeviation()).ToArray();
    }

    /// <summary>
    /// Over four noise draws with neighbours correlated over about a dozen points, the bootstrap standard errors average
    /// to within 30 % of the scatter over 40 independent draws, while the covariance ones fall short by a factor of
    /// about four (the tolerance allows for the sampling error of 40 replicates and 40 draws).
    /// </summary>
    [Fact]
    public void WithCorrelatedNoiseTheBootstrapFollowsTheScatterWhereTheCovarianceDoesNot()
    {
        var scatter = ScatterOverDraws(sigmaPoints: 6);
        var seeds = new[] { 7, 8, 9, 10 };
        var runs = seeds.Select(seed =>
        {
            var (problem, fit) = FitDraw(6, seed);
            return (Fit: fit, Bootstrap: SpectrumBootstrap.Run(problem, fit, new BootstrapOptions(Replicates, Seed: seed)));
        }).ToArray();
        foreach (var (_, bootstrap) in runs)
        {
            Assert.True(bootstrap.Converged >= Replicates - 2, $"{bootstrap.Converged} of {Replicates} replicates converged");
            Assert.True(bootstrap.BlockPoints > 6, $"block of {bootstrap.BlockPoints} points for noise correlated over about 12");
        }
        var parameters = runs[0].Fit.Parameters;
        for (var i = 0; i < parameters.Count; i++)
        {
            if (parameters[i].Kind is not (ParameterKind.ShiftPpm or ParameterKind.JHz)) continue;
            var bootstrapRatio = runs.Average(r => r.Bootstrap.StdErrors[i]) / scatter[i];
            var covarianceRatio = runs.Average(r => r.Fit.Parameters[i].StdError) / scatter[i];
            Assert.True(bootstrapRatio is > 0.7 and < 1.3, $"{parameters[i].Name}: bootstrap / scatter over draws = {bootstrapRatio:0.00}");
            Assert.True(covarianceRatio < 0.4, $"{parameters[i].Name}: covariance / scatter over draws = {covarianceRatio:0.00}");
        }
    }

    [Fact]
    public void WithIndependentNoiseTheBootstrapAgreesWithTheCovariance()
    {
        var (problem, fit) = FitDraw(0, 7);
        var bootstrap = SpectrumBootstrap.Run(problem, fit, new BootstrapOptions(Replicates));
        foreach (var (p, i) in fit.Parameters.Select((p, i) => (p, i)).Where(t => t.p.Kind is ParameterKind.ShiftPpm or ParameterKind.JHz))
        {
            var ratio = bootstrap.StdErrors[i] / p.StdError;
            Assert.True(ratio is > 0.7 and < 1.4, $"{p.Name}: bootstrap {bootstrap.StdErrors[i]:G3}, covariance {p.StdError:G3}");
        }
    }

    [Fact]
    public void BlockLengthFollowsTheCorrelation()
    {
        // Independent points: the autocorrelation is below 1/e at lag 1.
        Assert.Equal((int)Math.Ceiling(SpectrumBootstrap.BlocksPerCorrelationLength), SpectrumBootstrap.BlockLength(CorrelatedNoise(4000, 1, 0, 3)));
        var correlated = SpectrumBootstrap.BlockLength(CorrelatedNoise(4000, 1, 10, 3));
        // A Gaussian-smoothed series of kernel sigma s has autocorrelation exp(-k^2 / 4 s^2): 1/e at k = 2 s.
        Assert.InRange(correlated, SpectrumBootstrap.BlocksPerCorrelationLength * 18, SpectrumBootstrap.BlocksPerCorrelationLength * 22);
    }

    [Fact]
    public void ResamplingKeepsBlocksOfNeighboursWithinEachRegion()
    {
        // Two regions of fitted points with a gap between them (exact invariants of the resampling).
        var ppm = Enumerable.Range(0, 60).Select(i => 1.0 + 0.001 * i).Concat(Enumerable.Range(0, 40).Select(i => 3.0 + 0.001 * i)).ToArray();
        var segments = SpectrumBootstrap.Segments(ppm);
        Assert.Equal([(0, 60), (60, 100)], segments);
        var series = Enumerable.Range(0, 100).Select(i => (double)i).ToArray();
        var resampled = SpectrumBootstrap.Resample(series, segments, 10, new Random(5));
        Assert.Equal(100, resampled.Length);
        for (var b = 0; b < 100; b += 10)
            for (var k = 1; k < 10; k++) Assert.Equal(resampled[b] + k, resampled[b + k]);
        Assert.All(resampled.Take(60), v => Assert.InRange(v, 0, 59));
        Assert.All(resampled.Skip(60), v => Assert.InRange(v, 60, 99));
    }
}
