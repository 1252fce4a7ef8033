using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Spectrum;

public class SpectrumSimulatorTests
{
    private static SpinSystem AaBb() => SpinSystem.Create(new FieldMHz(60),
        [new("A", 7.30), new("A'", 7.30), new("B", 7.22), new("B'", 7.22), new("Me", 2.35, 3)],
        [new("A", "B", 8.2), new("A'", "B'", 8.2), new("A", "B'", 0.4), new("A'", "B", 0.4), new("A", "A'", 2.0), new("B", "B'", 2.4), new("Me", "B", 0.6), new("Me", "B'", 0.6)]);

    [Fact]
    public void IntegralsAreExactCountsEvenWhenStronglyCoupled()
    {
        // Exact invariant: sum over lines of intensity x (change of <Iz_e>) = Tr(F+ I-_e) = count_e 2^(N-1).
        var system = AaBb();
        var integrals = SpectrumSimulator.Integrals(system, SpectrumEngine.Compute(system, new EngineOptions(RelativeIntensityFloor: 1e-14)));
        foreach (var integral in integrals) Assert.Equal(integral.Count, integral.Value, 1e-9);
        Assert.Equal(3.0, integrals.Single(i => i.Id == "Me").Value, 1e-9);
    }

    [Fact]
    public void FinelySampledTraceIntegratesToTheSummedLineAreas()
    {
        // Common practice, no source: trapezoid rule over Hz on a grid with >= 20 points per FWHM; Gaussian lines leave
        // no tail beyond the window, so the integral equals the summed areas (= number of observed nuclei) within 0.1 %.
        var system = AaBb();
        var lines = SpectrumEngine.Compute(system);
        var settings = new SimulationSettings(new WidthHz(0.8), Lineshape.Gaussian, 8.5, 1.0, 2 * 65536);
        var simulated = SpectrumSimulator.Simulate(system, lines, settings);
        var stepHz = Math.Abs(simulated.Grid.StepHz);
        var y = simulated.Trace.Intensity;
        var integral = stepHz * (y.Sum() - 0.5 * (y[0] + y[^1]));
        Assert.Equal(7.0, integral, 7.0 * 1e-3);
    }

    [Fact]
    public void LorentzianTraceIntegratesToTheAreasLessTheTailsBeyondTheWindow()
    {
        // Source: the Lorentzian area between a and b, (1/pi)[atan(2(b - c)/G) - atan(2(a - c)/G)] (closed form); every
        // line is drawn whole, so only what lies beyond the window is missing. The sum times the step is the midpoint
        // rule over the window widened by half a step, exact for lines 30 steps wide (Poisson summation).
        var system = AaBb();
        var lines = SpectrumEngine.Compute(system);
        var settings = new SimulationSettings(new WidthHz(0.5), Lineshape.Lorentzian, 12, -3, 4 * 65536);
        var simulated = SpectrumSimulator.Simulate(system, lines, settings);
        var y = simulated.Trace.Intensity;
        var step = Math.Abs(simulated.Grid.StepHz);
        double low = Math.Min(simulated.Grid.HzAt(0), simulated.Grid.HzAt(simulated.Grid.Points - 1)) - step / 2;
        double high = Math.Max(simulated.Grid.HzAt(0), simulated.Grid.HzAt(simulated.Grid.Points - 1)) + step / 2;
        var expected = SpectrumSimulator.RenderLines(system, lines, settings.DefaultWidth)
            .Sum(l => l.Area / Math.PI * (Math.Atan(2 * (high - l.CentreHz) / l.FwhmHz) - Math.Atan(2 * (low - l.CentreHz) / l.FwhmHz)));
        Assert.Equal(expected, step * y.Sum(), 1e-10 * expected);
    }

    [Fact]
    public void PerNucleusWidthIsInheritedByItsLines()
    {
        var system = SpinSystem.Create(new FieldMHz(400), [new Nucleus("A", new ShiftPpm(7.0), 1, Isotope.H1, new WidthHz(3.0)), new("X", 2.0)], [new("A", "X", 7.0)]);
        var render = SpectrumSimulator.RenderLines(system, SpectrumEngine.Compute(system), new WidthHz(0.5));
        // Weak AX mixing (J/dnu = 0.0035) lends each line a trace of the other's width: 1e-4 Hz here.
        foreach (var line in render) Assert.Equal(line.CentreHz > 1600 ? 3.0 : 0.5, line.FwhmHz, 1e-4);
    }

    [Fact]
    public void DefaultWindowCoversTheVisibleLinesOnly()
    {
        var system = SpinSystem.Create(new FieldMHz(60), [new("CH2", 4.12, 2), new("CH3", 1.26, 3)], [new("CH2", "CH3", 7.1)]);
        var simulated = SpectrumSimulator.Simulate(system, SpectrumEngine.Compute(system), new SimulationSettings(new WidthHz(0.9), Lineshape.Lorentzian, Points: 4096));
        Assert.InRange(simulated.Grid.FromPpm, 4.3, 4.6);
        Assert.InRange(simulated.Grid.ToPpm, 0.8, 1.1);
    }
}
