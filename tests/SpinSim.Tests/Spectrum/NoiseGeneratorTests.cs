using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Spectrum;

public class NoiseGeneratorTests
{
    [Fact]
    public void Noise_HasZeroMeanAndTheRequestedSpread()
    {
        // Source: for n normal deviates the sample mean has standard error sigma / sqrt(n) and the sample
        // standard deviation about sigma / sqrt(2n); the bounds below are more than five of those.
        const int n = 200_000;
        const double sigma = 0.7;
        var trace = new double[n];
        NoiseGenerator.AddGaussian(trace, sigma, seed: 42);
        double mean = trace.Average();
        double sd = Math.Sqrt(trace.Sum(v => (v - mean) * (v - mean)) / (n - 1));
        Assert.True(Math.Abs(mean) < 5 * sigma / Math.Sqrt(n), $"mean {mean}");
        Assert.True(Math.Abs(sd - sigma) < 5 * sigma / Math.Sqrt(2.0 * n), $"sd {sd}");
        // Fraction within one sigma, 0.6827 for a normal distribution (erf(1 / sqrt 2)).
        double within = trace.Count(v => Math.Abs(v) <= sigma) / (double)n;
        Assert.True(Math.Abs(within - 0.682689) < 0.005, $"within one sigma {within}");
    }

    [Fact]
    public void SameSeed_GivesSameNoise_OnTopOfTheTrace()
    {
        var a = Enumerable.Repeat(1.0, 1_001).ToArray();
        var b = Enumerable.Repeat(1.0, 1_001).ToArray();
        var c = Enumerable.Repeat(1.0, 1_001).ToArray();
        NoiseGenerator.AddGaussian(a, 0.1, seed: 7);
        NoiseGenerator.AddGaussian(b, 0.1, seed: 7);
        NoiseGenerator.AddGaussian(c, 0.1, seed: 8);
        Assert.Equal(a, b);
        Assert.NotEqual(a, c);
        Assert.NotEqual(1.0, a[^1]); // an odd length still reaches the last point
    }

    [Fact]
    public void ZeroSigma_LeavesTheTrace_AndNegativeSigmaIsRejected()
    {
        var trace = new[] { 1.0, 2.0, 3.0 };
        NoiseGenerator.AddGaussian(trace, 0, seed: 1);
        Assert.Equal(new[] { 1.0, 2.0, 3.0 }, trace);
        Assert.Throws<ArgumentOutOfRangeException>(() => NoiseGenerator.AddGaussian(trace, -1, seed: 1));
        Assert.Throws<ArgumentOutOfRangeException>(() => NoiseGenerator.AddGaussian(trace, double.NaN, seed: 1));
    }
}
