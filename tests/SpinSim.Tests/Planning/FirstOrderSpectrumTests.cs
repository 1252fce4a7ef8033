using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Planning;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Planning;

public class FirstOrderSpectrumTests
{
    [Fact]
    public void AX2IsADoubletAndATripletWithBinomialIntensities()
    {
        // Common practice, no source: A split by two equivalent X into a 1:2:1 triplet, X2 by one A into a 1:1 doublet.
        var system = SpinSystem.Create(new FieldMHz(400), [new("A", 5.0), new("X", 2.0, 2)], [new("A", "X", 7.0)]);
        var lines = FirstOrderSpectrum.Compute(system).Lines;
        Assert.Equal(5, lines.Count);

        var a = lines.Where(l => l.FrequencyHz > 1000).ToArray();
        Assert.Equal([2000 - 7.0, 2000, 2000 + 7.0], a.Select(l => l.FrequencyHz), new Tolerance(1e-9));
        Assert.Equal([1.0, 2.0, 1.0], a.Select(l => l.Intensity / a[0].Intensity), new Tolerance(1e-12));

        var x = lines.Where(l => l.FrequencyHz < 1000).ToArray();
        Assert.Equal([800 - 3.5, 800 + 3.5], x.Select(l => l.FrequencyHz), new Tolerance(1e-9));
        Assert.Equal(x[0].Intensity, x[1].Intensity, 12);

        // Each entry's multiplet holds its count: A one nucleus, X two.
        Assert.Equal(2.0, x.Sum(l => l.Intensity) / a.Sum(l => l.Intensity), 12);
    }

    [Fact]
    public void TotalIntensityIsTheTraceOfFPlusFMinus()
    {
        // Exact invariant: the engine's normalisation, N 2^(N-1) for N observed spin-1/2 nuclei (2^M more for M unobserved).
        var system = SpinSystem.Create(new FieldMHz(300),
            [new("A", 4.1), new("B", 2.3, 2), new("C", 1.1, 3), new("F", -70, 1, Isotope.F19)],
            [new("A", "B", 6.5), new("B", "C", 7.2), new("A", "F", 48)]);
        var list = FirstOrderSpectrum.Compute(system);
        // 6 observed protons among 7 spin-1/2 nuclei: 6 x 2^6 = 384.
        Assert.Equal(384.0, list.TotalIntensity, 9);
        Assert.True(list.Lines.Zip(list.Lines.Skip(1)).All(p => p.First.FrequencyHz <= p.Second.FrequencyHz), "lines are sorted");
        // A: triplet of doublets (6 lines), B2: doublet of quartets (8), C3: triplet (3); F is not observed.
        Assert.Equal(6 + 8 + 3, list.Lines.Count);
    }

    [Fact]
    public void HeteronuclearPartnersSplitWithBinomialIntensities()
    {
        // Common practice, no source: a proton next to a CF3 group is a 1:3:3:1 quartet of spacing |J_HF|.
        var system = SpinSystem.Create(new FieldMHz(400), [new("H", 4.0), new("CF3", -75, 3, Isotope.F19)], [new("H", "CF3", -9.0)]);
        var lines = FirstOrderSpectrum.Compute(system).Lines;
        Assert.Equal([1600 - 13.5, 1600 - 4.5, 1600 + 4.5, 1600 + 13.5], lines.Select(l => l.FrequencyHz), new Tolerance(1e-9));
        Assert.Equal([1.0, 3.0, 3.0, 1.0], lines.Select(l => l.Intensity / lines[0].Intensity), new Tolerance(1e-12));
    }

    [Fact]
    public void PartnersOfTheSameShiftDoNotSplit()
    {
        // Common practice, no source: nuclei of equal shift show no splitting from each other in first order.
        var system = SpinSystem.Create(new FieldMHz(400), [new("A", 7.3), new("A'", 7.3), new("X", 6.9)],
            [new("A", "A'", 2.0), new("A", "X", 8.0)]);
        var lines = FirstOrderSpectrum.Compute(system, [0]).Lines;
        Assert.Equal([7.3 * 400 - 4, 7.3 * 400 + 4], lines.Select(l => l.FrequencyHz), new Tolerance(1e-9));
    }

    [Fact]
    public void OnlyTheChosenObservedEntriesGiveLines()
    {
        // Exact invariant of the definition: lines carry origin 1 on their own entry and none on the others.
        var system = SpinSystem.Create(new FieldMHz(400), [new("A", 5.0), new("X", 2.0, 2), new("F", -100, 1, Isotope.F19)],
            [new("A", "X", 7.0), new("X", "F", 20)]);
        var list = FirstOrderSpectrum.Compute(system, [1, 2]);
        Assert.Equal(4, list.Lines.Count); // X2 as dd: A and F split it; F itself is not observed
        for (var i = 0; i < list.Lines.Count; i++) Assert.Equal([0.0, 1.0, 0.0], list.OriginOf(i).ToArray());
        Assert.Throws<ArgumentOutOfRangeException>(() => FirstOrderSpectrum.Compute(system, [3]));
    }

    private sealed class Tolerance(double abs) : IEqualityComparer<double>
    {
        public bool Equals(double x, double y) => Math.Abs(x - y) <= abs;
        public int GetHashCode(double obj) => 0;
    }
}
