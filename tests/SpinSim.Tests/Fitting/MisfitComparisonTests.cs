using MathNet.Numerics.Distributions;
using SpinSim.Core.Fitting;

namespace SpinSim.Tests.Fitting;

public class MisfitComparisonTests
{
    [Fact]
    public void WhiteNoiseHasAboutAsManyEffectivePointsAsPoints()
    {
        // Exact invariant in expectation: independent points have rho_k = 0, so n_eff = n (the sampled rho_1 stops the sum early).
        var random = new Random(3);
        var noise = Enumerable.Range(0, 20_000).Select(_ => Normal.Sample(random, 0, 1)).ToArray();
        var n = MisfitComparison.EffectivePoints([noise]);
        Assert.InRange(n, 0.95 * noise.Length, 1.0 * noise.Length);
    }

    [Fact]
    public void FirstOrderAutoregressiveNoiseMatchesTheClosedForm()
    {
        // Source: Bayley & Hammersley, J. R. Stat. Soc. Suppl. 8, 184 (1946): for rho_k = phi^k the integrated time is
        // (1 + phi) / (1 - phi), so n_eff = n (1 - phi) / (1 + phi): a third of the points at phi = 0.5.
        const double phi = 0.5;
        var random = new Random(5);
        var series = new double[200_000];
        for (var i = 1; i < series.Length; i++) series[i] = phi * series[i - 1] + Normal.Sample(random, 0, 1);
        var n = MisfitComparison.EffectivePoints([series]);
        Assert.InRange(n / series.Length, 0.30, 0.37);
    }

    [Fact]
    public void RunsAddUp()
    {
        // Exact invariant: separate runs are independent, so their effective points add.
        var random = new Random(9);
        var a = Enumerable.Range(0, 500).Select(_ => random.NextDouble()).ToArray();
        var b = Enumerable.Range(0, 700).Select(_ => random.NextDouble()).ToArray();
        Assert.Equal(MisfitComparison.EffectivePoints([a]) + MisfitComparison.EffectivePoints([b]), MisfitComparison.EffectivePoints([a, b]), 9);
    }

    [Theory]
    // Source: Hamilton, Acta Cryst. 18, 502 (1965): R(b, n - m, alpha) = sqrt(1 + b F(b, n - m, alpha) / (n - m)); with
    // b = 1 and n - m = 100, F(1, 100, 0.05) = 3.936 (standard F tables, value from memory), so RSS ratio 1.03936.
    [InlineData(100 + 3, 3, 1.03936)]
    public void CriticalRatioFollowsHamilton(double points, int parameters, double expected) =>
        Assert.Equal(expected, MisfitComparison.CriticalRatio(points, parameters), 4);

    [Fact]
    public void ProbabilityAtTheCriticalRatioIsTheLevel()
    {
        // Exact invariant: the critical ratio is where the tail probability equals the level.
        var critical = MisfitComparison.CriticalRatio(5000, 9);
        Assert.Equal(MisfitComparison.SignificanceLevel, MisfitComparison.Probability(critical, 5000, 9), 9);
        Assert.Equal(1, MisfitComparison.Probability(1, 5000, 9));
        Assert.True(MisfitComparison.Probability(1.2, 5000, 9) < 1e-12);
    }
}
