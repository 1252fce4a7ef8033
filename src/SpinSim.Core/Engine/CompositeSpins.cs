// Composite-particle reduction of magnetically equivalent sets: P. L. Corio, Structure of High-Resolution NMR Spectra, Academic Press 1966.
namespace SpinSim.Core.Engine;

/// <summary>One total spin F of a set of n equivalent spin-1/2 nuclei, with how many times it occurs.</summary>
/// <param name="TwiceF">2F, an integer so that half-integer spins stay exact.</param>
/// <param name="Multiplicity">Number of independent irreducible copies with this F.</param>
public readonly record struct TotalSpin(int TwiceF, long Multiplicity)
{
    public double F => TwiceF / 2.0;
    public int Dimension => TwiceF + 1;
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
            var multiplicity = Binomial(n, k) - (k >= 1 ? Binomial(n, k - 1) : 0);
            list.Add(new TotalSpin(twiceF, multiplicity));
        }
        return list;
    }

    /// <summary>&lt;m +- 1|F+-|m&gt; = sqrt(F(F+1) - m(m +- 1)).</summary>
    public static double LadderElement(double f, double m, int direction) => Math.Sqrt(f * (f + 1) - m * (m + direction));

    private static long Binomial(int n, int k)
    {
        if (k < 0 || k > n) return 0;
        long r = 1;
        for (var i = 1; i <= k; i++) r = r * (n - k + i) / i;
        return r;
    }
}
