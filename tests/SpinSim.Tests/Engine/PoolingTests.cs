using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Engine;

/// <summary>Lines below the floor are pooled into fixed bins, keeping intensity, first moment and integrals.</summary>
public class PoolingTests
{
    private static readonly EngineOptions Everything = new(RelativeIntensityFloor: 1e-14);

    /// <summary>A floor so high that most lines of a strongly coupled system fall below it.</summary>
    private static readonly EngineOptions Coarse = new(RelativeIntensityFloor: 1e-3);

    [Fact]
    public void PoolingKeepsTheSumRuleFirstMomentAndIntegralsOfEveryEntry()
    {
        // Exact invariants: Tr(F+ F-) = N 2^(N-1); first moment = mean shift (Van Vleck, Phys. Rev. 74, 1168, 1948);
        // per-entry integrals Tr(F+ I-_e) = count_e 2^(N-1). A pool carries its lines' sums of all three.
        var system = InvariantTests.RandomStronglyCoupled(8, 31, fieldMHz: 400);
        var fine = SpectrumEngine.Compute(system, Everything);
        var coarse = SpectrumEngine.Compute(system, Coarse with { PoolWidthHz = 0.5 });
        Assert.True(coarse.PooledLines > 0 && coarse.Lines.Count < fine.Lines.Count / 2, $"{coarse.Lines.Count} lines of {fine.Lines.Count}");

        Assert.Equal(8 * Math.Pow(2, 7), coarse.TotalIntensity, 1e-9);
        double Mean(LineList l) => l.Lines.Sum(x => x.Intensity * x.FrequencyHz) / l.TotalIntensity;
        Assert.Equal(Mean(fine), Mean(coarse), 1e-9);
        var a = SpectrumSimulator.Integrals(system, fine);
        var b = SpectrumSimulator.Integrals(system, coarse);
        for (var e = 0; e < a.Count; e++) Assert.Equal(a[e].Value, b[e].Value, 1e-9);
    }

    [Fact]
    public void PoolsAreOnePerBinAndEachLiesInItsBin()
    {
        // Exact invariant of the construction: bins are [k w, (k + 1) w), merged across block pairs, and a pool sits at
        // the centroid of its lines, inside the bin.
        var system = InvariantTests.RandomStronglyCoupled(8, 32, fieldMHz: 400);
        var width = 0.05;
        var coarse = SpectrumEngine.Compute(system, Coarse with { PoolWidthHz = width });
        var fine = SpectrumEngine.Compute(system, Everything);
        var floor = 1e-3 * coarse.ExpectedTotalIntensity;
        var weakBins = fine.Lines.Where(l => l.Intensity <= floor).Select(l => Math.Floor(l.FrequencyHz / width)).Distinct().Count();
        // Degenerate transitions merged in the fine list may straddle a bin edge, so allow a few more pools than bins.
        Assert.InRange(coarse.PooledLines, weakBins, weakBins + 5);
        var strong = fine.Lines.Where(l => l.Intensity > floor).ToList();
        foreach (var s in strong) Assert.Contains(coarse.Lines, c => Math.Abs(c.FrequencyHz - s.FrequencyHz) < 1e-9 && Math.Abs(c.Intensity - s.Intensity) < 1e-9);
    }

    [Theory]
    [InlineData(0.01)]
    [InlineData(1e-7)] // too many bins for dense arrays: the dictionary form
    public void AWeakLineAloneInItsBinKeepsItsFrequencyIntensityAndOrigin(double widthHz)
    {
        // ABX (invented values) with every line below the floor: the lines are far apart, so each bin holds one and the
        // pooled list equals the exact one.
        var system = SpinSystem.Create(new FieldMHz(100), [new("A", 2.74), new("B", 2.61), new("X", 4.08)],
            [new("A", "B", -16.4), new("A", "X", 4.7), new("B", "X", 8.9)]);
        var exact = SpectrumEngine.Compute(system, Everything);
        var pooled = SpectrumEngine.Compute(system, new EngineOptions(RelativeIntensityFloor: 1.0, PoolWidthHz: widthHz));
        Assert.Equal(exact.Lines.Count, pooled.PooledLines);
        Assert.Equal(exact.Lines.Count, pooled.Lines.Count);
        for (var k = 0; k < exact.Lines.Count; k++)
        {
            Assert.Equal(exact.Lines[k].FrequencyHz, pooled.Lines[k].FrequencyHz, 1e-9);
            Assert.Equal(exact.Lines[k].Intensity, pooled.Lines[k].Intensity, 1e-12);
            for (var e = 0; e < 3; e++) Assert.Equal(exact.OriginOf(k)[e], pooled.OriginOf(k)[e], 1e-9);
        }
    }

    [Fact]
    public void DefaultOptionsLoseNoIntensity()
    {
        // Exact invariant Tr(F+ F-) = N 2^(N-1): with pooling only numerical zeros (amplitude below 1e-10) are left out.
        var system = InvariantTests.RandomStronglyCoupled(9, 33, fieldMHz: 400);
        var lines = SpectrumEngine.Compute(system);
        Assert.Equal(9 * Math.Pow(2, 8), lines.TotalIntensity, 1e-9);
    }

    [Fact]
    public void PoolWidthMustBePositive()
    {
        var system = InvariantTests.RandomStronglyCoupled(3, 34);
        Assert.Throws<ArgumentOutOfRangeException>(() => SpectrumEngine.Compute(system, new EngineOptions(PoolWidthHz: 0)));
    }
}
