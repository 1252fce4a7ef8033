using System.Numerics;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Engine;

/// <summary>Total spins of equivalent sets, exact up to the count limit (P. L. Corio, Structure of High-Resolution NMR Spectra, 1966).</summary>
public class CompositeSpinsTests
{
    [Fact]
    public void The_count_limit_is_64()
    {
        // The limit these tests run at; if it moves, the tests below must move with it.
        Assert.Equal(64, SpinSystemRules.MaxCount);
    }

    [Theory]
    [InlineData(1)]
    [InlineData(9)]
    [InlineData(61)]
    [InlineData(62)]
    [InlineData(63)]
    [InlineData(64)]
    public void Multiplicities_times_dimensions_fill_the_space_exactly(int n)
    {
        // Exact invariant: the total spins decompose the 2^n states, sum over F of multiplicity x (2F + 1) = 2^n.
        var spins = CompositeSpins.Decompose(n);
        var sum = spins.Aggregate(BigInteger.Zero, (acc, s) => acc + s.Multiplicity * s.Dimension);
        Assert.Equal(BigInteger.One << n, sum);
        Assert.All(spins, s => Assert.True(s.Multiplicity >= 0));
    }

    [Fact]
    public void The_binomial_at_the_limit_is_exact()
    {
        // Exact identity (Vandermonde): C(64, 32) = sum over k of C(32, k)^2, computed here independently of the product formula.
        var vandermonde = Enumerable.Range(0, 33).Aggregate(BigInteger.Zero, (acc, k) => acc + BigInteger.Pow(CompositeSpins.Binomial(32, k), 2));
        Assert.Equal(vandermonde, CompositeSpins.Binomial(64, 32));
        // From memory of tables of central binomial coefficients, checked by the identity above: C(64, 32) = 1,832,624,140,942,590,534, past 2^60.
        Assert.Equal(BigInteger.Parse("1832624140942590534"), CompositeSpins.Binomial(64, 32));
        // Pascal's rule near the limit, all exact: C(64, k) = C(63, k - 1) + C(63, k).
        for (var k = 1; k < 64; k++)
            Assert.Equal(CompositeSpins.Binomial(63, k - 1) + CompositeSpins.Binomial(63, k), CompositeSpins.Binomial(64, k));
        // F = 0 of 64 nuclei: the Catalan-type count C(64, 32) - C(64, 31) = C(64, 32) / 33 (central binomial over m + 1, m = 32).
        var singlet = CompositeSpins.Decompose(64).Single(s => s.TwiceF == 0);
        Assert.Equal(CompositeSpins.Binomial(64, 32) / 33, singlet.Multiplicity);
        Assert.Equal(BigInteger.Zero, CompositeSpins.Binomial(64, 32) % 33);
    }

    [Theory]
    [InlineData(62)]
    [InlineData(64)]
    public void A_large_set_coupled_to_one_proton_integrates_to_its_count(int n)
    {
        // Exact invariants: each entry integrates to its count; Tr(F+ F-) = N 2^(N-1). Before the binomials were exact,
        // 62 nuclei printed 62.04 and 0.96.
        var system = SpinSystem.Create(new FieldMHz(400), [new("X", 2.0), new("A", 1.0, n)], [new("X", "A", 7.0)]);
        var lines = SpectrumEngine.Compute(system);
        var integrals = SpectrumSimulator.Integrals(system, lines).ToDictionary(i => i.Id, i => i.Value);
        Assert.Equal(n, integrals["A"], 9);
        Assert.Equal(1.0, integrals["X"], 9);
        var expected = (n + 1) * Math.Pow(2, n);
        Assert.True(Math.Abs(lines.TotalIntensity - expected) <= 1e-12 * expected, $"total {lines.TotalIntensity:R}, expected {expected:R}");
    }

    [Fact]
    public void Counts_and_sizes_beyond_the_limits_are_refused_with_the_limit_stated()
    {
        var tooMany = Assert.Throws<SpinSystemException>(() => SpinSystem.Create(new FieldMHz(400), [new("A", 1.0, 65)], []));
        Assert.Contains("more than 64", tooMany.Message);
        // 16 sets of 64: 1024 nuclei, past the 1000 whose N 2^(N-1) stays a finite double.
        var nuclei = Enumerable.Range(0, 16).Select(i => new Nucleus($"S{i}", i * 0.5, 64)).ToArray();
        var tooLarge = Assert.Throws<SpinSystemException>(() => SpinSystem.Create(new FieldMHz(400), nuclei, []));
        Assert.Contains("1024 nuclei in all, more than the 1000", tooLarge.Message);
    }
}
