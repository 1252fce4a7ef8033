using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Engine;

/// <summary>
/// Derivatives of lines by shifts and couplings (perturbation theory in the engine) against exact invariants and against
/// central differences of the engine's own lines and of a broadened spectrum. Systems are invented.
/// </summary>
public class LineDerivativeTests
{
    private static readonly EngineOptions Options = new(RelativeIntensityFloor: 1e-14, PoolWeakLines: false);

    private static SpinParameter[] AllParameters(SpinSystem s) =>
        Enumerable.Range(0, s.Nuclei.Count).Select(e => new SpinParameter(e))
            .Concat(s.Couplings.Select(c => new SpinParameter(s.IndexOf(c.A), s.IndexOf(c.B)))).ToArray();

    /// <summary>Moves one parameter by <paramref name="h"/> Hz (a shift by h / observe MHz ppm).</summary>
    private static SpinSystem Moved(SpinSystem s, SpinParameter p, double h)
    {
        if (p.IsShift)
        {
            var mhz = s.Nuclei[p.EntryA].Isotope.ObserveMHz(s.Field);
            return s.WithNuclei(s.Nuclei.Select((n, i) => i == p.EntryA ? n with { Shift = new ShiftPpm(n.Shift.Value + h / mhz) } : n));
        }
        return s.WithCouplings(s.Couplings.Select(c =>
            (s.IndexOf(c.A), s.IndexOf(c.B)) is var (a, b) && ((a == p.EntryA && b == p.EntryB) || (a == p.EntryB && b == p.EntryA))
                ? c with { J = new CouplingHz(c.J.Value + h) } : c));
    }

    public static TheoryData<string> Systems() => new() { "random5", "methyl", "aabb", "twins", "fluorine" };

    private static SpinSystem Named(string name) => name switch
    {
        "random5" => InvariantTests.RandomStronglyCoupled(5, 11),
        // A methyl (a composite set) next to a strongly coupled pair.
        "methyl" => SpinSystem.Create(new FieldMHz(60),
            [new("Me", 1.21, 3), new("Ha", 2.52), new("Hb", 2.61), new("Hc", 4.02)],
            [new("Me", "Ha", 7.1), new("Ha", "Hb", -14.2), new("Hb", "Hc", 6.3), new("Ha", "Hc", 5.2), new("Me", "Hc", 0.4)]),
        // A symmetric AA'BB' ring: degenerate eigenstates, coincident lines.
        "aabb" => SpinSystem.Create(new FieldMHz(80),
            [new("HA", 7.30), new("HA'", 7.30), new("HB", 7.05), new("HB'", 7.05)],
            [new("HA", "HB", 8.4), new("HA'", "HB'", 8.4), new("HA", "HB'", 0.4), new("HA'", "HB", 0.4), new("HA", "HA'", 2.1), new("HB", "HB'", 2.5)]),
        // Two identical AB fragments that do not couple to each other: exactly degenerate product states in one block,
        // which a shift of one fragment alone splits.
        "twins" => SpinSystem.Create(new FieldMHz(60),
            [new("HA", 3.00), new("HB", 3.10), new("HC", 3.00), new("HD", 3.10)],
            [new("HA", "HB", 7.0), new("HC", "HD", 7.0)]),
        // An ABX with 19F as X: heteronuclear (secular) couplings and an unobserved shift.
        _ => SpinSystem.Create(new FieldMHz(100),
            [new("HA", 4.40), new("HB", 4.48), new("F", -120.0, 1, Isotope.F19)],
            [new("HA", "HB", -11.5), new("HA", "F", 47.0), new("HB", "F", 21.0)]),
    };

    /// <summary>
    /// Exact invariants: the total intensity Tr(F+ F-) does not depend on any shift or coupling, so sum dI = 0; the first
    /// moment sum I nu is sum over observed entries of nu_e n_e 2^(N-1) (J. H. Van Vleck, Phys. Rev. 74, 1168, 1948), so its
    /// derivative is n_e 2^(N-1) for an observed shift and 0 for anything else.
    /// </summary>
    [Theory]
    [MemberData(nameof(Systems))]
    public void SumRuleAndFirstMomentDerivativesAreExact(string name)
    {
        var system = Named(name);
        var parameters = AllParameters(system);
        var lines = SpectrumEngine.ComputeWithDerivatives(system, Options, parameters);
        var d = lines.Derivatives!;
        var spins = system.Nuclei.Sum(n => n.Count);
        for (var k = 0; k < parameters.Length; k++)
        {
            double sumDI = 0, sumDM = 0;
            for (var l = 0; l < lines.Lines.Count; l++)
            {
                sumDI += d.IntensityOf(l)[k];
                sumDM += d.MomentOf(l)[k] + d.IntensityOf(l)[k] * lines.Lines[l].FrequencyHz;
            }
            var p = parameters[k];
            var expected = p.IsShift && system.Nuclei[p.EntryA].Isotope == system.Observed ? system.Nuclei[p.EntryA].Count * Math.Pow(2, spins - 1) : 0;
            Assert.True(Math.Abs(sumDI) < 1e-9 * lines.ExpectedTotalIntensity, $"{name} parameter {k}: sum dI = {sumDI}");
            Assert.True(Math.Abs(sumDM - expected) < 1e-9 * lines.ExpectedTotalIntensity, $"{name} parameter {k}: d(first moment) = {sumDM}, expected {expected}");
        }
    }

    /// <summary>Hellmann-Feynman: a line's frequency moves with the shift of entry e by its origin weight (the change of expected Iz_e).</summary>
    [Fact]
    public void ShiftDerivativeOfFrequencyIsTheOriginWeight()
    {
        var system = Named("random5");
        var parameters = Enumerable.Range(0, 5).Select(e => new SpinParameter(e)).ToArray();
        var lines = SpectrumEngine.ComputeWithDerivatives(system, Options, parameters);
        for (var l = 0; l < lines.Lines.Count; l++)
        {
            if (lines.Lines[l].Intensity < 1e-6) continue;
            for (var e = 0; e < 5; e++)
                Assert.Equal(lines.OriginOf(l)[e], lines.Derivatives!.MomentOf(l)[e] / lines.Lines[l].Intensity, 1e-9);
        }
    }

    /// <summary>Line by line against central differences (h = 1e-4 Hz) where no two lines coincide.</summary>
    [Fact]
    public void LinesAgreeWithCentralDifferences()
    {
        var system = Named("random5");
        var parameters = AllParameters(system);
        var lines = SpectrumEngine.ComputeWithDerivatives(system, Options, parameters);
        const double h = 1e-4;
        for (var k = 0; k < parameters.Length; k++)
        {
            var plus = SpectrumEngine.Compute(Moved(system, parameters[k], h), Options);
            var minus = SpectrumEngine.Compute(Moved(system, parameters[k], -h), Options);
            Assert.Equal(lines.Lines.Count, plus.Lines.Count);
            Assert.Equal(lines.Lines.Count, minus.Lines.Count);
            for (var l = 0; l < lines.Lines.Count; l++)
            {
                var dI = (plus.Lines[l].Intensity - minus.Lines[l].Intensity) / (2 * h);
                var dNu = (plus.Lines[l].FrequencyHz - minus.Lines[l].FrequencyHz) / (2 * h);
                Assert.Equal(dI, lines.Derivatives!.IntensityOf(l)[k], 1e-6);
                if (lines.Lines[l].Intensity > 1e-3)
                    Assert.Equal(dNu, lines.Derivatives.MomentOf(l)[k] / lines.Lines[l].Intensity, 1e-6);
            }
        }
    }

    /// <summary>
    /// The derivative of a Lorentzian-broadened spectrum, sum over lines of dI L + I dnu dL/dnu, against central
    /// differences of the spectrum itself: this holds through coincident lines and degenerate states, where single
    /// lines have no derivative of their own.
    /// </summary>
    [Theory]
    [MemberData(nameof(Systems))]
    public void BroadenedSpectrumAgreesWithCentralDifferences(string name)
    {
        var system = Named(name);
        var parameters = AllParameters(system);
        var lines = SpectrumEngine.ComputeWithDerivatives(system, Options, parameters);
        var low = lines.Lines.Min(l => l.FrequencyHz) - 5;
        var high = lines.Lines.Max(l => l.FrequencyHz) + 5;
        var grid = Enumerable.Range(0, 2001).Select(i => low + (high - low) * i / 2000.0).ToArray();
        const double half = 0.4, h = 1e-4;
        double[] Spectrum(LineList list) => grid.Select(x => list.Lines.Sum(l => l.Intensity * half / Math.PI / ((x - l.FrequencyHz) * (x - l.FrequencyHz) + half * half))).ToArray();
        var height = Spectrum(lines).Max();
        for (var k = 0; k < parameters.Length; k++)
        {
            var plus = Spectrum(SpectrumEngine.Compute(Moved(system, parameters[k], h), Options));
            var minus = Spectrum(SpectrumEngine.Compute(Moved(system, parameters[k], -h), Options));
            for (var i = 0; i < grid.Length; i += 7)
            {
                double analytic = 0;
                for (var l = 0; l < lines.Lines.Count; l++)
                {
                    var dx = grid[i] - lines.Lines[l].FrequencyHz;
                    var q = dx * dx + half * half;
                    var shape = half / Math.PI / q;
                    var slope = 2 * dx * half / Math.PI / (q * q); // d shape / d nu_line
                    analytic += lines.Derivatives!.IntensityOf(l)[k] * shape + lines.Derivatives.MomentOf(l)[k] * slope;
                }
                var numeric = (plus[i] - minus[i]) / (2 * h);
                Assert.True(Math.Abs(analytic - numeric) < 1e-5 * height, $"{name} parameter {k} at {grid[i]:0.###} Hz: analytic {analytic}, differences {numeric}");
            }
        }
    }

    [Fact]
    public void SplitPlansAndPooledLinesAreRefused()
    {
        var system = Named("methyl");
        Assert.Throws<InvalidOperationException>(() => SpectrumEngine.ComputeWithDerivatives(system, EngineOptions.Default, [new SpinParameter(0)]));
        Assert.Throws<InvalidOperationException>(() =>
            SpectrumEngine.ComputeWithDerivatives(system, Options with { Splitting = ClusterSplitting.Split }, [new SpinParameter(0)]));
    }
}
