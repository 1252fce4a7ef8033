using SpinSim.Core.Engine;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Fitting;

/// <summary>
/// The two solutions of an ABX analysis from its AB part. Source: J. A. Pople, W. G. Schneider, H. J. Bernstein,
/// High-resolution Nuclear Magnetic Resonance (McGraw-Hill 1959), ch. 6: the AB part fixes J_AB, J_AX + J_BX and the two
/// effective shift differences |dnu_AB +- (J_AX - J_BX)/2|, which leaves dnu_AB and (J_AX - J_BX)/2 exchangeable.
/// Systems are invented.
/// </summary>
public class AbxAlternativeTests
{
    private static readonly EngineOptions Exact = new(RelativeIntensityFloor: 1e-14);

    private static SpinSystem Abx(double field, double ppmA, double ppmB, double jab, double jax, double jbx, Isotope x, double ppmX) =>
        SpinSystem.Create(new FieldMHz(field),
            [new Nucleus("A", ppmA), new Nucleus("B", ppmB), new Nucleus("X", ppmX, 1, x)],
            [new Coupling("A", "B", jab), new Coupling("A", "X", jax), new Coupling("B", "X", jbx)]);

    [Theory]
    [InlineData(60, 3.10, 2.95, -14.0, 7.5, -2.0)]
    [InlineData(400, 2.78, 2.70, -16.2, 4.1, 9.6)]
    [InlineData(80, 6.32, 6.25, 1.8, 12.4, 6.9)]
    public void SecondSolutionHasTheSameAbPartWhenXIsAnotherIsotope(double field, double ppmA, double ppmB, double jab, double jax, double jbx)
    {
        // With X = 19F the A-X and B-X couplings are J Iz Iz exactly (science.md), so the closed form is exact and the
        // observed (1H) spectrum is the AB part alone: both solutions must give the same lines to rounding.
        var first = Abx(field, ppmA, ppmB, jab, jax, jbx, Isotope.F19, -115.0);
        var second = AbxAlternative.SecondSolution(first, "A", "B", "X");
        Assert.NotNull(second);

        // The closed form's other solution: dnu' = (J_AX - J_BX)/2 and (J_AX' - J_BX')/2 = dnu, same centre and sum.
        var dnu = (ppmA - ppmB) * field;
        var centre = (ppmA + ppmB) / 2 * field;
        Assert.Equal(centre + (jax - jbx) / 4, second!.FrequencyHz(0), 9);
        Assert.Equal(centre - (jax - jbx) / 4, second.FrequencyHz(1), 9);
        Assert.Equal((jax + jbx) / 2 + dnu, second.Couplings[1].J.Value, 9);
        Assert.Equal((jax + jbx) / 2 - dnu, second.Couplings[2].J.Value, 9);
        Assert.Equal(jab, second.Couplings[0].J.Value);

        var a = Significant(SpectrumEngine.Compute(first, Exact).Lines);
        var b = Significant(SpectrumEngine.Compute(second, Exact).Lines);
        Assert.Equal(a.Count, b.Count);
        for (var k = 0; k < a.Count; k++)
        {
            Assert.True(Math.Abs(a[k].FrequencyHz - b[k].FrequencyHz) <= 1e-9, $"line {k}: {a[k].FrequencyHz} vs {b[k].FrequencyHz} Hz");
            Assert.True(Math.Abs(a[k].Intensity - b[k].Intensity) <= 1e-9, $"line {k}: intensity {a[k].Intensity} vs {b[k].Intensity}");
        }
    }

    [Fact]
    public void SecondSolutionDiffersInTheXPartWhenXIsAProton()
    {
        // The X part tells the solutions apart (same source): its intensities depend on the mixing of the two AB
        // sub-quartets, which the exchange changes. The AB part agrees to first order in J/dnu_AX.
        var first = Abx(60, 3.10, 2.95, -14.0, 7.5, -2.0, Isotope.H1, 4.40);
        var second = AbxAlternative.SecondSolution(first, "A", "B", "X")!;
        var a = SpectrumEngine.Compute(first, Exact).Lines;
        var b = SpectrumEngine.Compute(second, Exact).Lines;
        var xA = Significant(a.Where(l => l.ShiftPpm > 4).ToList());
        var xB = Significant(b.Where(l => l.ShiftPpm > 4).ToList());
        var largestDifference = xA.Zip(xB, (p, q) => Math.Abs(p.Intensity - q.Intensity)).Max();
        Assert.True(largestDifference > 0.05, $"X parts differ by at most {largestDifference} in intensity");

        // Combination lines (below 1e-3 of a unit line) are left out: they exist only through the X mixing.
        var abA = Significant(a.Where(l => l.ShiftPpm < 4).ToList(), 1e-3);
        var abB = Significant(b.Where(l => l.ShiftPpm < 4).ToList(), 1e-3);
        Assert.Equal(abA.Count, abB.Count);
        // J^2 / dnu_AX with dnu_AX = 78 Hz and |J| up to 7.5 Hz: about 0.7 Hz of second-order shift at most.
        for (var k = 0; k < abA.Count; k++) Assert.True(Math.Abs(abA[k].FrequencyHz - abB[k].FrequencyHz) < 0.7, $"{k}: {abA[k]} {abB[k]}");
    }

    [Fact]
    public void NoSecondSolutionWithoutBothCouplingsToX()
    {
        var system = SpinSystem.Create(new FieldMHz(60), [new Nucleus("A", 3.1), new Nucleus("B", 2.95), new Nucleus("X", 4.4)],
            [new Coupling("A", "B", -14.0), new Coupling("A", "X", 7.5)]);
        Assert.Null(AbxAlternative.SecondSolution(system, "A", "B", "X"));
    }

    private static List<Line> Significant(IReadOnlyList<Line> lines, double floor = 1e-9) =>
        lines.Where(l => l.Intensity > floor).OrderBy(l => l.FrequencyHz).ToList();
}
