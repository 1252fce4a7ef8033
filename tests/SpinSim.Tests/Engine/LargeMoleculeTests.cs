using SpinSim.Core.Engine;
using SpinSim.Formats.SpinSystems;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Engine;

/// <summary>The invented 40-proton example (spin-systems/large-molecule-40h.toml), simulated split as the default options do.</summary>
public class LargeMoleculeTests
{
    private static readonly Lazy<(SpinSim.Core.Model.SpinSystem System, LineList Lines)> Simulated = new(() =>
    {
        var system = SpinSystemFiles.Read(Path.Combine(ReferenceData.RepositoryRoot, "spin-systems", "large-molecule-40h.toml")).System;
        return (system, SpectrumEngine.Compute(system));
    });

    [Fact]
    public void ExampleReadsAsFortyProtonsAt400MHz()
    {
        var system = Simulated.Value.System;
        Assert.Equal(40, system.ObservedNucleusCount);
        Assert.Equal(40, system.Nuclei.Sum(n => n.Count));
        Assert.Equal(400, system.Field.Value);
        Assert.Contains("invented values", system.Title);
        Assert.False(SpectrumEngine.PlanFor(system, EngineOptions.Default).IsExact);
    }

    [Fact]
    public void SplitSimulationKeepsTheSumRule()
    {
        // Exact invariant: Tr(F+ F-) = N 2^(N-1) = 40 x 2^39, also for the split result (it holds per cluster and configuration).
        var lines = Simulated.Value.Lines;
        const double expected = 21_990_232_555_520; // 40 x 549,755,813,888
        Assert.Equal(expected, lines.ExpectedTotalIntensity);
        Assert.True(Math.Abs(lines.TotalIntensity - expected) <= 1e-6 * expected, $"total {lines.TotalIntensity:R}, expected {expected:R}");
    }

    [Fact]
    public void FirstMomentIsTheMeanShift()
    {
        // Source: first-moment theorem, J. H. Van Vleck, Phys. Rev. 74, 1168 (1948); the J Iz Iz terms kept between
        // clusters commute with F- as well, so it holds for the split result.
        var (system, lines) = Simulated.Value;
        var mean = lines.Lines.Sum(l => l.Intensity * l.FrequencyHz) / lines.TotalIntensity;
        var expected = Enumerable.Range(0, system.Nuclei.Count).Sum(e => system.Nuclei[e].Count * system.FrequencyHz(e)) / 40;
        Assert.Equal(expected, mean, 1e-4);
    }
}
