// Composite-particle reduction of magnetically equivalent sets: P. L. Corio, Structure of High-Resolution NMR Spectra, Academic Press 1966.
using System.Numerics;

namespace SpinSim.Core.Engine;

/// <summary>One total spin F of a set of n equivalent spin-1/2 nuclei, with how many times it occurs.</summary>
/// <param name="TwiceF">2F, an integer so that half-integer spins stay exact.</param>
/// <param name="Multiplicity">Number of independent irreducible copies with this F, exact (it passes 2^63 from 64 nuclei on).</param>
public readonly record struct TotalSpin(int TwiceF, BigInteger Multiplicity)
{
    public double F => TwiceF / 2.0;
    public int Dimension => TwiceF + 1;

    /// <summary>The multiplicity as a weight, rounded once from the exact integer (relative error below 2^-52).</summary>
    public double Weight => (double)Multiplicity;
}

public static class CompositeSpins
{
    /// <summary>
    /// Total spins F = n/2, n/2 - 1, ... of n spin-1/2 nuclei with multiplicity C(n, n/2 - F) - C(n, n/2 - F - 1).
    /// The sum over F of multiplicity x (2F + 1) is 2^n.
    /// </summary>
    public static IReadOnlyList<TotalSpin> Decompose(int n)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(n, 1);
        var list = new List<TotalSpin>();
        for (var twiceF = n; twiceF >= 0; twiceF -= 2)
        {
            var k = (n - twiceF) / 2; // n/2 - F
            // The difference of two nearly equal binomials: exact integers, so nothing cancels.
            list.Add(new TotalSpin(twiceF, Binomial(n, k) - Binomial(n, k - 1)));
        }
        return list;
    }

    /// <summary>&lt;m +- 1|F+-|m&gt; = sqrt(F(F+1) - m(m +- 1)).</summary>
    public static double LadderElement(double f, double m, int direction) => Math.Sqrt(f * (f + 1) - m * (m + direction));

    /// <summary>The binomial coefficient C(n, k), exact; 0 outside 0 &lt;= k &lt;= n.</summary>
    public static BigInteger Binomial(int n, int k)
    {
        if (k < 0 || k > n) return BigInteger.Zero;
        k = Math.Min(k, n - k);
        var r = BigInteger.One;
        // r stays C(n - k + i, i), an integer, after every step.
        for (var i = 1; i <= k; i++) r = r * (n - k + i) / i;
        return r;
    }
}
