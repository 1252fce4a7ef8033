using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Engine;

/// <summary>Weak-coupling clusters (Castillo, Patiny &amp; Wist, J. Magn. Reson. 209, 123, 2011) against the exact engine.</summary>
public class ClusterTests
{
    private static readonly EngineOptions Exact = new(RelativeIntensityFloor: 1e-14, Splitting: ClusterSplitting.Exact);

    private static EngineOptions Split(double threshold) => new(RelativeIntensityFloor: 1e-14, Splitting: ClusterSplitting.Split, WeakCouplingRatio: threshold);

    /// <summary>
    /// Invented 11-spin system: an aromatic AB pair, an ABX-like CH-CH2 fragment, a CH2-CH3 pair at close shifts and an
    /// OH, joined to each other only by weak long-range couplings (|J/dnu| at most 0.0016).
    /// </summary>
    private static SpinSystem ElevenSpins() => SpinSystem.Create(new FieldMHz(400),
        [new("Ar1", 7.42), new("Ar2", 7.31), new("CH", 3.20), new("Ha", 2.95), new("Hb", 2.83), new("CH2", 1.45, 2), new("Me", 1.18, 3), new("OH", 2.40)],
        [new("Ar1", "Ar2", 8.1), new("CH", "Ha", 5.2), new("CH", "Hb", 8.4), new("Ha", "Hb", -14.8), new("CH2", "Me", 7.0),
         new("Ar2", "CH", 0.6), new("CH", "CH2", 1.1), new("Hb", "OH", 0.3), new("Ar1", "Ha", 0.4), new("CH", "OH", 0.5)]);

    /// <summary>A Lorentzian trace (FWHM 1 Hz) on a fine grid, computed directly; only for comparing line lists.</summary>
    private static double[] Trace(LineList lines, double fromHz, double toHz, int points, double fwhmHz = 1.0)
    {
        var y = new double[points];
        var half = fwhmHz / 2;
        foreach (var l in lines.Lines)
        {
            var centre = (int)((l.FrequencyHz - fromHz) / (toHz - fromHz) * (points - 1));
            for (var i = Math.Max(0, centre - 4000); i < Math.Min(points, centre + 4000); i++)
            {
                var x = fromHz + (toHz - fromHz) * i / (points - 1) - l.FrequencyHz;
                y[i] += l.Intensity * half / Math.PI / (x * x + half * half);
            }
        }
        return y;
    }

    private static double RelativeError(SpinSystem system, EngineOptions options)
    {
        var exact = Trace(SpectrumEngine.Compute(system, Exact), 300, 3100, 56001);
        var split = Trace(SpectrumEngine.Compute(system, options), 300, 3100, 56001);
        return exact.Zip(split, (a, b) => Math.Abs(a - b)).Max() / exact.Max();
    }

    [Fact]
    public void SplitTraceAgreesWithExactWithinOnePercentAndErrorShrinksWithThreshold()
    {
        // Published claim checked: the fragment approach reproduces the exact spectrum when cut couplings are weak.
        var system = ElevenSpins();
        var errors = new[] { 0.2, 0.05, 0.01, 0.0001 }.Select(t => RelativeError(system, Split(t))).ToArray();
        Assert.True(errors[1] < 0.01, $"error at the default threshold 0.05: {errors[1]:P3}");
        for (var k = 1; k < errors.Length; k++)
            Assert.True(errors[k] <= errors[k - 1] + 1e-12, $"errors must not grow as the threshold drops: {string.Join(", ", errors)}");
        Assert.True(errors[^1] < 1e-9, "at a threshold below every |J/dnu| the split result is exact");
    }

    [Fact]
    public void ClustersThatDoNotInteractGiveTheSameLinesAsSeparateSimulations()
    {
        // Exact invariant: with no couplings between two groups, each group's spectrum is unchanged by the other,
        // its intensities multiplied by the other group's 2^n states.
        var field = new FieldMHz(300);
        var first = SpinSystem.Create(field, [new("A", 3.10), new("B", 3.02), new("C", 2.70)], [new("A", "B", 11), new("B", "C", 6.5), new("A", "C", 3)]);
        var second = SpinSystem.Create(field, [new("P", 6.9), new("Q", 6.85, 2)], [new("P", "Q", 7.7)]);
        var both = SpinSystem.Create(field, first.Nuclei.Concat(second.Nuclei), first.Couplings.Concat(second.Couplings));

        var split = SpectrumEngine.Compute(both, Split(0.05));
        var separate = SpectrumEngine.Compute(first, Exact).Lines.Select(l => l with { Intensity = l.Intensity * 8 })
            .Concat(SpectrumEngine.Compute(second, Exact).Lines.Select(l => l with { Intensity = l.Intensity * 8 }))
            .OrderBy(l => l.FrequencyHz).ToList();
        Assert.Equal(2, SpectrumEngine.PlanFor(both, Split(0.05)).Clusters.Count);
        Assert.Equal(separate.Count, split.Lines.Count);
        for (var k = 0; k < separate.Count; k++)
        {
            Assert.Equal(separate[k].FrequencyHz, split.Lines[k].FrequencyHz, 1e-9);
            Assert.Equal(separate[k].Intensity, split.Lines[k].Intensity, 1e-9);
        }
        // And the exact engine on the combined system agrees as well.
        var exact = SpectrumEngine.Compute(both, Exact);
        Assert.Equal(exact.Lines.Count, split.Lines.Count);
        for (var k = 0; k < exact.Lines.Count; k++) Assert.Equal(exact.Lines[k].FrequencyHz, split.Lines[k].FrequencyHz, 1e-8);
    }

    [Fact]
    public void SplittingKeepsTheSumRuleAndFirstMoment()
    {
        // Tr(F+ F-) = N 2^(N-1) and the first moment (Van Vleck, Phys. Rev. 74, 1168, 1948) hold for every cluster and
        // spectator configuration, so they hold for the split result too.
        var system = ElevenSpins();
        var lines = SpectrumEngine.Compute(system, Split(0.05));
        Assert.Equal(11 * Math.Pow(2, 10), lines.TotalIntensity, 1e-6);
        var mean = lines.Lines.Sum(l => l.Intensity * l.FrequencyHz) / lines.TotalIntensity;
        var expected = Enumerable.Range(0, system.Nuclei.Count).Sum(i => system.Nuclei[i].Count * system.FrequencyHz(i)) / 11;
        Assert.Equal(expected, mean, 1e-7);
    }

    [Fact]
    public void PlanReportsClustersAndTheLargestCutRatio()
    {
        var system = ElevenSpins();
        var plan = ClusterPartition.Plan(system, 0.05);
        // Ar1-Ar2 (8.1/44 = 0.18), CH-Ha-Hb (0.10, 0.057), CH2-Me (7/108 = 0.065) stay together; OH alone -> 4 clusters.
        Assert.Equal(4, plan.Clusters.Count);
        var cut = new[] { 0.6 / (3.20 - 7.31), 1.1 / (3.20 - 1.45), 0.4 / (7.42 - 2.95), 0.3 / (2.83 - 2.40), 0.5 / (3.20 - 2.40) }
            .Select(r => Math.Abs(r) / 400).Max();
        Assert.Equal(cut, plan.LargestCutRatio, 12);
    }

    [Theory]
    [InlineData(1, 1, 6.8, 1.68, 0.88)]
    [InlineData(1, 3, 6.8, 1.68, 0.88)]
    [InlineData(1, 6, 6.8, 1.68, 0.88)]
    [InlineData(2, 3, 7.0, 4.01, 1.40)]
    [InlineData(1, 9, 0.6, 7.20, 1.31)]
    public void DisplacementEstimateCoversHowFarTheStrongLinesMove(int countX, int countA, double jHz, double shiftX, double shiftA)
    {
        // Second-order perturbation theory (common practice, no source): the left-out flip-flop term moves lines by
        // about J^2 g_X g_A / (2 |dnu|). Checked against the exact engine for X_m A_n pairs split at |J/dnu| of 0.002 to
        // 0.02: every line above 5 % of the tallest lies within the estimate of a line of the split result.
        var system = SpinSystem.Create(new FieldMHz(400), [new("X", shiftX, countX), new("A", shiftA, countA)], [new("X", "A", jHz)]);
        var plan = ClusterPartition.Plan(system, 0.05);
        Assert.Equal(2, plan.Clusters.Count);
        var single = Assert.Single(plan.Cut);
        Assert.Equal(Math.Abs(jHz) / (Math.Abs(shiftX - shiftA) * 400), single.Ratio, 12);
        var estimate = plan.LargestDisplacementEstimate().Hz;
        Assert.Equal(jHz * jHz * CutCoupling.LadderSquareFactor(countX) * CutCoupling.LadderSquareFactor(countA) / (2 * Math.Abs(shiftX - shiftA) * 400), estimate, 12);

        var exact = SpectrumEngine.Compute(system, Exact).Lines;
        var split = SpectrumEngine.Compute(system, Split(0.05)).Lines;
        var tallest = exact.Max(l => l.Intensity);
        var worst = exact.Where(l => l.Intensity > 0.05 * tallest).Max(l => split.Min(s => Math.Abs(s.FrequencyHz - l.FrequencyHz)));
        Assert.True(worst <= estimate, $"a strong line moved {worst:G4} Hz, more than the estimate {estimate:G4} Hz");
        Assert.True(worst >= estimate / 8, $"the estimate {estimate:G4} Hz is far above the largest move {worst:G4} Hz");
    }

    [Fact]
    public void LadderSquareFactorIsTheLargestSquaredLadderElementOfTheTotalSpins()
    {
        // Exact invariant: max over F and m of F(F+1) - m(m+1) for n equivalent spin-1/2 nuclei, F = n/2 and m = -1/2 or 0.
        for (var n = 1; n <= 12; n++)
        {
            var best = CompositeSpins.Decompose(n).Max(s => Enumerable.Range(0, s.Dimension - 1)
                .Select(k => Math.Pow(CompositeSpins.LadderElement(s.F, -s.F + k, +1), 2)).DefaultIfEmpty(0).Max());
            Assert.Equal(best, CutCoupling.LadderSquareFactor(n), 9);
        }
    }

    [Fact]
    public void ExactPlanCutsNothing()
    {
        var plan = ClusterPartition.Whole(ElevenSpins());
        Assert.Empty(plan.Cut);
        Assert.Null(plan.StrongestCut);
        Assert.Equal((0.0, -1), plan.LargestDisplacementEstimate());
    }

    [Fact]
    public void UnobservedStronglyCoupledGroupIsKeptWithItsProtons()
    {
        // Two 19F at the same shift with a large F-F coupling are not in Iz eigenstates, so they must be diagonalised
        // with the protons they couple to; the split result then equals the exact one.
        var system = SpinSystem.Create(new FieldMHz(300),
            [new("A", 6.5), new("A'", 6.5), new("X", -120.0, 1, Isotope.F19), new("X'", -120.0, 1, Isotope.F19), new("Me", 1.0, 3)],
            [new("A", "A'", 2.0), new("X", "X'", 40.0), new("A", "X", -3.0), new("A'", "X'", -3.0), new("A", "X'", 18.0), new("A'", "X", 18.0), new("Me", "A", 0.5)]);
        var split = SpectrumEngine.Compute(system, Split(0.05));
        var exact = SpectrumEngine.Compute(system, Exact);
        Assert.Equal(exact.TotalIntensity, split.TotalIntensity, 1e-8);
        var strongExact = exact.Lines.Where(l => l.ShiftPpm > 5 && l.Intensity > 1e-3).ToList();
        foreach (var l in strongExact)
            Assert.Contains(split.Lines, s => Math.Abs(s.FrequencyHz - l.FrequencyHz) < 0.01);
    }
}
