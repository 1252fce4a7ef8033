// Normal deviates: G. E. P. Box and M. E. Muller, Ann. Math. Statist. 29, 610 (1958).
namespace SpinSim.Core.Spectrum;

/// <summary>Reproducible white Gaussian noise for demonstrations and tests, not for statistics that need a strong generator.</summary>
public static class NoiseGenerator
{
    /// <summary>Adds independent normal noise of standard deviation <paramref name="sigma"/> to every point, the same for the same seed.</summary>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="sigma"/> is negative or not finite.</exception>
    public static void AddGaussian(double[] trace, double sigma, int seed)
    {
        ArgumentNullException.ThrowIfNull(trace);
        if (!(sigma >= 0) || !double.IsFinite(sigma))
            throw new ArgumentOutOfRangeException(nameof(sigma), sigma, "the noise standard deviation must be a finite number >= 0");
        var random = new Random(seed);
        for (int i = 0; i < trace.Length; i += 2)
        {
            // 1 - u lies in (0, 1], keeping the logarithm finite.
            double radius = sigma * Math.Sqrt(-2 * Math.Log(1 - random.NextDouble()));
            var (sin, cos) = Math.SinCos(2 * Math.PI * random.NextDouble());
            trace[i] += radius * cos;
            if (i + 1 < trace.Length) trace[i + 1] += radius * sin;
        }
    }
}
