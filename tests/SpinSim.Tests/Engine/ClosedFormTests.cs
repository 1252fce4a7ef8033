using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Engine;

/// <summary>The engine against the published closed forms of small second-order systems.</summary>
public class ClosedFormTests
{
    private static readonly EngineOptions Options = new(RelativeIntensityFloor: 1e-14);

    private static SpinSystem System(double fieldMHz, (string Id, double Ppm, int Count, Isotope? Iso)[] nuclei, params (string A, string B, double J)[] couplings) =>
        SpinSystem.Create(new FieldMHz(fieldMHz),
            nuclei.Select(n => new Nucleus(n.Id, n.Ppm, n.Count, n.Iso ?? Isotope.H1)),
            couplings.Select(c => new Coupling(c.A, c.B, c.J)));

    private static void AssertLines(IReadOnlyList<Line> actual, IList<(double F, double I)> expected, double fTol, double iTol)
    {
        var exp = expected.Where(e => e.I > 1e-12).OrderBy(e => e.F).ToList();
        var act = actual.Where(l => l.Intensity > 1e-12).OrderBy(l => l.FrequencyHz).ToList();
        Assert.Equal(exp.Count, act.Count);
        for (var k = 0; k < exp.Count; k++)
        {
            Assert.True(Math.Abs(exp[k].F - act[k].FrequencyHz) <= fTol, $"line {k}: expected {exp[k].F} Hz, got {act[k].FrequencyHz} Hz");
            Assert.True(Math.Abs(exp[k].I - act[k].Intensity) <= iTol, $"line {k} at {exp[k].F} Hz: expected intensity {exp[k].I}, got {act[k].Intensity}");
        }
    }

    /// <summary>AB quartet; intensities on the scale where the four lines sum to 4 (= N 2^(N-1)).</summary>
    private static List<(double F, double I)> AbQuartet(double nuA, double nuB, double j)
    {
        var nu0 = (nuA + nuB) / 2;
        var d = Math.Sqrt((nuA - nuB) * (nuA - nuB) + j * j);
        var sin2Theta = j / d;
        return
        [
            (nu0 + (d + j) / 2, 1 - sin2Theta),
            (nu0 + (d - j) / 2, 1 + sin2Theta),
            (nu0 - (d - j) / 2, 1 + sin2Theta),
            (nu0 - (d + j) / 2, 1 - sin2Theta),
        ];
    }

    [Theory]
    [InlineData(400, 7.30, 7.20, 8.5)]
    [InlineData(60, 7.30, 7.20, 8.5)]
    [InlineData(100, 3.90, 3.85, -14.2)]
    [InlineData(80, 5.00, 4.9999, 10.0)]
    public void AbQuartetMatchesClosedForm(double field, double ppmA, double ppmB, double j)
    {
        // Source: AB closed form, Pople, Schneider & Bernstein, High-resolution NMR (McGraw-Hill 1959):
        // D = sqrt(dnu^2 + J^2), lines at nu0 +- (D +- J)/2, intensities 1 -+ J/D.
        var system = System(field, [("A", ppmA, 1, null), ("B", ppmB, 1, null)], ("A", "B", j));
        var lines = SpectrumEngine.Compute(system, Options).Lines;
        AssertLines(lines, AbQuartet(ppmA * field, ppmB * field, j), 1e-9, 1e-9);
    }

    [Theory]
    [InlineData(100, 2.00, 1.90, 6.0)]   // Delta/J = 1.67
    [InlineData(60, 6.95, 7.05, 7.8)]    // B downfield of A
    [InlineData(300, 4.10, 4.08, -3.0)]  // negative J, Delta/J = 2
    public void Ab2MatchesClosedForm(double field, double ppmA, double ppmB, double j)
    {
        // Source: AB2 closed form, Bernstein, Pople & Schneider, Can. J. Chem. 35, 65 (1957): with nu0 = (nuA + nuB)/2,
        // Delta = nuA - nuB, C+- = 1/2 sqrt(Delta^2 +- Delta J + 9 J^2 / 4), the nine lines lie at
        // nu0 + 3J/4 +- C+, nuB +- C+ +- C-, nu0 - 3J/4 +- C-, and nuA.
        var nuA = ppmA * field;
        var nuB = ppmB * field;
        var system = System(field, [("A", ppmA, 1, null), ("B", ppmB, 2, null)], ("A", "B", j));
        var lines = SpectrumEngine.Compute(system, Options).Lines;

        var delta = nuA - nuB;
        var cPlus = 0.5 * Math.Sqrt(delta * delta + delta * j + 2.25 * j * j);
        var cMinus = 0.5 * Math.Sqrt(delta * delta - delta * j + 2.25 * j * j);
        var nu0 = (nuA + nuB) / 2;
        var expected = new List<double>
        {
            nu0 + 0.75 * j + cPlus, nu0 + 0.75 * j - cPlus,
            nuB + cPlus + cMinus, nuB + cPlus - cMinus, nuB - cPlus + cMinus, nuB - cPlus - cMinus,
            nu0 - 0.75 * j + cMinus, nu0 - 0.75 * j - cMinus, nuA,
        };
        // Every closed-form position carries a line (the combination line may be weak but not zero here).
        var significant = lines.Where(l => l.Intensity > 1e-9).ToList();
        Assert.Equal(9, significant.Count);
        foreach (var f in expected)
            Assert.Contains(significant, l => Math.Abs(l.FrequencyHz - f) < 1e-9);
        // Exact sum rule: 3 observed spin-1/2 nuclei give N 2^(N-1) = 12.
        Assert.Equal(12.0, lines.Sum(l => l.Intensity), 9);
    }

    [Theory]
    [InlineData(400, 3.10, 2.95, -16.5, 7.0, 4.0)]
    [InlineData(80, 3.10, 2.95, -16.5, 7.0, 4.0)]
    [InlineData(100, 2.51, 2.50, 15.0, 8.0, 2.0)] // deceptively simple: Delta_AB = 1 Hz << J_AB
    [InlineData(60, 4.40, 4.20, 12.0, -3.0, 9.0)]
    public void AbxWithHeteronuclearXMatchesClosedForm(double field, double ppmA, double ppmB, double jab, double jax, double jbx)
    {
        // Source: ABX closed form, Bernstein, Pople & Schneider, Can. J. Chem. 35, 65 (1957): the AB part is two AB
        // quartets with effective shifts nuA +- JAX/2, nuB +- JBX/2 for the two X spin states. With X = 19F the
        // A-X and B-X couplings are J Iz Iz exactly, so the closed form is exact here.
        var system = System(field, [("A", ppmA, 1, null), ("B", ppmB, 1, null), ("X", -110.0, 1, Isotope.F19)],
            ("A", "B", jab), ("A", "X", jax), ("B", "X", jbx));
        var lines = SpectrumEngine.Compute(system, Options).Lines;
        var nuA = ppmA * field;
        var nuB = ppmB * field;
        // Each X state gives one AB sub-quartet of total intensity 4; together 8 = N 2^(N-1) x 2 for the unobserved X.
        var expected = AbQuartet(nuA + jax / 2, nuB + jbx / 2, jab).Concat(AbQuartet(nuA - jax / 2, nuB - jbx / 2, jab)).ToList();
        AssertLines(lines, MergeClose(expected, 1e-6), 1e-9, 1e-9);
    }

    [Fact]
    public void DeceptivelySimpleAbxLooksLikeATriplet()
    {
        // Source: Bernstein, Pople & Schneider, Can. J. Chem. 35, 65 (1957): when |nuA - nuB| << J_AB the X part
        // collapses to an apparent 1:2:1 triplet split by (JAX + JBX)/2, hiding the individual couplings
        // (its centre pair lies +-(D+ - D-) from nuX, here 0.02 Hz apart).
        var system = System(400, [("A", 2.5002, 1, null), ("B", 2.5000, 1, null), ("X", 4.80, 1, null)],
            ("A", "B", -15.0), ("A", "X", 9.0), ("B", "X", 3.0));
        var x = SpectrumEngine.Compute(system, Options).Lines.Where(l => l.ShiftPpm > 4.0).ToList();
        var groups = Clusters(x, 0.5).Where(g => g.Intensity > 0.02 * x.Sum(l => l.Intensity)).ToList();
        Assert.Equal(3, groups.Count);
        Assert.Equal(6.0, groups[1].FrequencyHz - groups[0].FrequencyHz, 1);
        Assert.Equal(6.0, groups[2].FrequencyHz - groups[1].FrequencyHz, 1);
        Assert.InRange(groups[1].Intensity / groups[0].Intensity, 1.8, 2.2); // apparent, not exact
    }

    [Theory]
    [InlineData(7.0, 9.0, 6.5, 1.5)]
    [InlineData(2.0, 40.0, -3.0, 18.0)]
    [InlineData(8.4, 8.4, 2.0, 0.3)]
    public void AaXxWithFluorineMatchesKlmnClosedForm(double jaa, double jxx, double jax, double jaxPrime)
    {
        // Source: AA'XX' closed form, McConnell, McLean & Reilly, J. Chem. Phys. 23, 1152 (1955): with K = JAA' + JXX',
        // M = JAA' - JXX', N = JAX + JAX', L = JAX - JAX', the A half-spectrum has lines at nuA +- N/2,
        // nuA +- K/2 +- sqrt(K^2 + L^2)/2 and nuA +- M/2 +- sqrt(M^2 + L^2)/2. X = 19F makes the A-X couplings exactly J Iz Iz.
        var system = System(300, [("A", 6.5, 1, null), ("A'", 6.5, 1, null), ("X", -120.0, 1, Isotope.F19), ("X'", -120.0, 1, Isotope.F19)],
            ("A", "A'", jaa), ("X", "X'", jxx), ("A", "X", jax), ("A'", "X'", jax), ("A", "X'", jaxPrime), ("A'", "X", jaxPrime));
        var lines = SpectrumEngine.Compute(system, Options).Lines.Where(l => l.Intensity > 1e-9).ToList();
        double nuA = 6.5 * 300, k = jaa + jxx, m = jaa - jxx, n = jax + jaxPrime, l = jax - jaxPrime;
        var sk = Math.Sqrt(k * k + l * l) / 2;
        var sm = Math.Sqrt(m * m + l * l) / 2;
        double[] expected = [nuA + n / 2, nuA - n / 2,
            nuA + k / 2 + sk, nuA + k / 2 - sk, nuA - k / 2 + sk, nuA - k / 2 - sk,
            nuA + m / 2 + sm, nuA + m / 2 - sm, nuA - m / 2 + sm, nuA - m / 2 - sm];
        foreach (var f in expected)
            Assert.Contains(lines, x => Math.Abs(x.FrequencyHz - f) < 1e-8);
        foreach (var x in lines)
            Assert.Contains(expected, f => Math.Abs(x.FrequencyHz - f) < 1e-8);
    }

    [Fact]
    public void A2X3AtLargeSeparationIsFirstOrder()
    {
        // Common practice, no source: at |delta nu| / |J| > 1000 an A2X3 system shows a 1:3:3:1 quartet (A) and a
        // 1:2:1 triplet (X) with spacing J; deviations scale as J/delta nu (here 1e-3 relative).
        const double j = 7.0;
        var system = System(400, [("A", 20.0, 2, null), ("X", 2.0, 3, null)], ("A", "X", j)); // 7200 Hz apart = 1029 J
        var lines = Clusters(SpectrumEngine.Compute(system, Options).Lines, 0.1).Where(l => l.Intensity > 1e-3).ToList();
        var a = lines.Where(l => l.ShiftPpm > 10).OrderBy(l => l.FrequencyHz).ToList();
        var x = lines.Where(l => l.ShiftPpm < 10).OrderBy(l => l.FrequencyHz).ToList();
        Assert.Equal(4, a.Count);
        Assert.Equal(3, x.Count);
        AssertMultiplet(a, 8000.0, j, [1, 3, 3, 1]);
        AssertMultiplet(x, 800.0, j, [1, 2, 1]);
    }

    [Fact]
    public void Ax2AtLargeSeparationIsFirstOrder()
    {
        // Common practice, no source: AX2 at |delta nu| / |J| > 1000: A is a 1:2:1 triplet, X a 1:1 doublet, spacing J.
        const double j = 5.5;
        var system = System(100, [("A", 70.0, 1, null), ("X", 1.0, 2, null)], ("A", "X", j)); // 6900 Hz = 1255 J
        var lines = Clusters(SpectrumEngine.Compute(system, Options).Lines, 0.1).Where(l => l.Intensity > 1e-3).ToList();
        AssertMultiplet(lines.Where(l => l.ShiftPpm > 10).OrderBy(l => l.FrequencyHz).ToList(), 7000.0, j, [1, 2, 1]);
        AssertMultiplet(lines.Where(l => l.ShiftPpm < 10).OrderBy(l => l.FrequencyHz).ToList(), 100.0, j, [1, 1]);
    }

    private static void AssertMultiplet(List<Line> lines, double centreHz, double j, int[] binomial)
    {
        Assert.Equal(binomial.Length, lines.Count);
        var total = lines.Sum(l => l.Intensity);
        for (var k = 0; k < binomial.Length; k++)
        {
            var expectedF = centreHz + (k - (binomial.Length - 1) / 2.0) * j;
            Assert.True(Math.Abs(lines[k].FrequencyHz - expectedF) < 0.02, $"line {k}: {lines[k].FrequencyHz} vs {expectedF}");
            var expectedShare = binomial[k] / (double)binomial.Sum();
            Assert.True(Math.Abs(lines[k].Intensity / total - expectedShare) < 5e-3 * expectedShare + 1e-4,
                $"line {k}: share {lines[k].Intensity / total} vs {expectedShare}");
        }
    }

    /// <summary>Groups lines closer than <paramref name="gapHz"/> (unresolvable second-order splittings) into one.</summary>
    private static List<Line> Clusters(IEnumerable<Line> lines, double gapHz)
    {
        var result = new List<Line>();
        foreach (var l in lines.OrderBy(l => l.FrequencyHz))
        {
            if (result.Count > 0 && l.FrequencyHz - result[^1].FrequencyHz <= gapHz)
            {
                var last = result[^1];
                var sum = last.Intensity + l.Intensity;
                var f = (last.FrequencyHz * last.Intensity + l.FrequencyHz * l.Intensity) / sum;
                result[^1] = last with { FrequencyHz = f, ShiftPpm = last.ShiftPpm * f / last.FrequencyHz, Intensity = sum };
            }
            else result.Add(l);
        }
        return result;
    }

    private static List<(double F, double I)> MergeClose(List<(double F, double I)> lines, double tol)
    {
        var sorted = lines.OrderBy(l => l.F).ToList();
        var merged = new List<(double F, double I)>();
        foreach (var l in sorted)
            if (merged.Count > 0 && l.F - merged[^1].F <= tol) merged[^1] = (merged[^1].F, merged[^1].I + l.I);
            else merged.Add(l);
        return merged;
    }
}
