using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Units;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Engine;

/// <summary>Exact invariants of the transition list and agreement with a brute-force full-space reference.</summary>
public class InvariantTests
{
    private static readonly EngineOptions Options = new(RelativeIntensityFloor: 1e-14);

    public static SpinSystem RandomStronglyCoupled(int n, int seed, double fieldMHz = 100)
    {
        var random = new Random(seed);
        var nuclei = Enumerable.Range(0, n).Select(i => new Nucleus($"H{i}", 2.0 + 0.15 * random.NextDouble())).ToList();
        var couplings = new List<Coupling>();
        for (var a = 0; a < n; a++)
            for (var b = a + 1; b < n; b++)
                couplings.Add(new Coupling($"H{a}", $"H{b}", Math.Round(-16 + 32 * random.NextDouble(), 3)));
        return SpinSystem.Create(new FieldMHz(fieldMHz), nuclei, couplings);
    }

    [Theory]
    [InlineData(3, 1)]
    [InlineData(4, 2)]
    [InlineData(5, 3)]
    [InlineData(6, 4)]
    [InlineData(7, 5)]
    [InlineData(8, 6)]
    public void RandomSystemsAgreeWithBruteForce(int n, int seed)
    {
        var system = RandomStronglyCoupled(n, seed);
        var engine = SpectrumEngine.Compute(system, Options).Lines.Where(l => l.Intensity > 1e-9).ToList();
        var reference = BruteForce.Lines(system, floor: 1e-14).Where(l => l.Intensity > 1e-9).ToList();
        Assert.Equal(reference.Count, engine.Count);
        for (var k = 0; k < reference.Count; k++)
        {
            Assert.Equal(reference[k].FrequencyHz, engine[k].FrequencyHz, 1e-7);
            Assert.Equal(reference[k].Intensity, engine[k].Intensity, 1e-8);
        }
    }

    [Theory]
    [InlineData(4, 11)]
    [InlineData(6, 12)]
    [InlineData(9, 13)]
    public void TotalIntensityIsNTimesTwoToTheNMinusOne(int n, int seed)
    {
        // Exact sum rule Tr(F+ F-) = N 2^(N-1) for N observed spin-1/2 nuclei.
        var result = SpectrumEngine.Compute(RandomStronglyCoupled(n, seed), Options);
        Assert.Equal(n * Math.Pow(2, n - 1), result.TotalIntensity, 1e-8 * n * Math.Pow(2, n - 1));
    }

    [Theory]
    [InlineData(5, 21)]
    [InlineData(8, 22)]
    public void FirstMomentIsTheMeanShiftWhateverTheCouplings(int n, int seed)
    {
        // Source: first-moment theorem, J. H. Van Vleck, Phys. Rev. 74, 1168 (1948): couplings commute with F-.
        var system = RandomStronglyCoupled(n, seed);
        var lines = SpectrumEngine.Compute(system, Options).Lines;
        var mean = lines.Sum(l => l.Intensity * l.FrequencyHz) / lines.Sum(l => l.Intensity);
        var expected = Enumerable.Range(0, n).Average(system.FrequencyHz);
        Assert.Equal(expected, mean, 1e-8);
    }

    [Fact]
    public void FirstMomentHoldsWithSetsAndHeteronuclearPartners()
    {
        // Van Vleck (1948) as above; heteronuclear J Iz Iz terms leave the 1H first moment unchanged because Tr Iz(19F) = 0.
        var system = SpinSystem.Create(new FieldMHz(80),
            [new("Me", 1.2, 3), new("CH2", 1.35, 2), new("H", 4.1), new("F", -180.0, 1, Isotope.F19)],
            [new("Me", "CH2", 7.1), new("CH2", "H", 6.0), new("H", "F", 47.0), new("CH2", "F", 22.0)]);
        var lines = SpectrumEngine.Compute(system, Options).Lines;
        var mean = lines.Sum(l => l.Intensity * l.ShiftPpm) / lines.Sum(l => l.Intensity);
        Assert.Equal((3 * 1.2 + 2 * 1.35 + 4.1) / 6, mean, 1e-10);
        Assert.Equal(6 * Math.Pow(2, 6), lines.Sum(l => l.Intensity), 1e-7);
    }

    [Fact]
    public void EquivalentSetEqualsTheSameSpinsWrittenOutAndInnerCouplingsChangeNothing()
    {
        // Source: composite particles, P. L. Corio, Structure of High-Resolution NMR Spectra (1966): an equivalent set
        // is exactly its total-spin decomposition, and couplings inside the set drop out.
        var field = new FieldMHz(60);
        var compact = SpinSystem.Create(field, [new("Me", 1.10, 3), new("CH", 1.30), new("X", 1.45)],
            [new("Me", "CH", 6.8), new("CH", "X", 11.0), new("Me", "X", 0.7)]);
        var compactLines = SpectrumEngine.Compute(compact, Options).Lines.Where(l => l.Intensity > 1e-9).ToList();
        foreach (var inner in new[] { 0.0, -12.4, 30.0 })
        {
            var written = SpinSystem.Create(field,
                [new("M1", 1.10), new("M2", 1.10), new("M3", 1.10), new("CH", 1.30), new("X", 1.45)],
                [new("M1", "M2", inner), new("M1", "M3", inner), new("M2", "M3", inner),
                 new("M1", "CH", 6.8), new("M2", "CH", 6.8), new("M3", "CH", 6.8),
                 new("CH", "X", 11.0), new("M1", "X", 0.7), new("M2", "X", 0.7), new("M3", "X", 0.7)]);
            var writtenLines = SpectrumEngine.Compute(written, Options with { MergeToleranceHz = 1e-5 }).Lines.Where(l => l.Intensity > 1e-9).ToList();
            Assert.Equal(compactLines.Count, writtenLines.Count);
            for (var k = 0; k < compactLines.Count; k++)
            {
                Assert.Equal(compactLines[k].FrequencyHz, writtenLines[k].FrequencyHz, 1e-6);
                Assert.Equal(compactLines[k].Intensity, writtenLines[k].Intensity, 1e-7);
            }
        }
    }

    [Fact]
    public void TertButylCostsOneSpinNineHalvesParticle()
    {
        // A tert-butyl set of 9 is reduced to total spins; its largest block is 10 x 10 (F = 9/2, coupled to one spin:
        // blocks of at most 2 states), never 2^9.
        var system = SpinSystem.Create(new FieldMHz(400), [new("tBu", 1.25, 9), new("H", 1.27)], [new("tBu", "H", 0.5)]);
        var result = SpectrumEngine.Compute(system, Options);
        Assert.True(result.LargestBlock <= 2, $"largest block {result.LargestBlock}");
        Assert.Equal(10 * Math.Pow(2, 9), result.TotalIntensity, 1e-6);
    }

    [Fact]
    public void OriginWeightsNameTheFlippingNucleus()
    {
        var system = SpinSystem.Create(new FieldMHz(400), [new("A", 7.0), new("X", 2.0)], [new("A", "X", 7.0)]);
        var result = SpectrumEngine.Compute(system);
        for (var i = 0; i < result.Lines.Count; i++)
        {
            var expected = result.Lines[i].ShiftPpm > 4 ? 0 : 1;
            Assert.Equal(expected, result.DominantEntries(i)[0]);
            Assert.Equal(1.0, result.OriginOf(i).ToArray().Sum(), 12);
        }
    }

    [Fact]
    public void OversizedSystemIsRefusedWithItsSize()
    {
        var nuclei = Enumerable.Range(0, 24).Select(i => new Nucleus($"H{i}", 1 + 0.01 * i)).ToList();
        var couplings = Enumerable.Range(1, 23).Select(i => new Coupling($"H{i - 1}", $"H{i}", 7)).ToList();
        var system = SpinSystem.Create(new FieldMHz(400), nuclei, couplings);
        var e = Assert.Throws<SystemTooLargeException>(() => SpectrumEngine.Compute(system));
        Assert.Contains("2704156", e.Message);
    }
}
