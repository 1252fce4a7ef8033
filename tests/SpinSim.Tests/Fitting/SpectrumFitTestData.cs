using SpinSim.Core.Engine;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Fitting;

/// <summary>Invented test systems and synthetic traces (known truth plus seeded noise) for the fitting tests.</summary>
public static class SpectrumFitTestData
{
    /// <summary>Invented AA'BB' ring at 80 MHz.</summary>
    public static SpinSystem AaBb() => SpinSystem.Create(new FieldMHz(80),
        [new("HA", 7.34), new("HA'", 7.34), new("HB", 7.08), new("HB'", 7.08)],
        [new("HA", "HB", 8.6), new("HA'", "HB'", 8.6), new("HA", "HB'", 0.35), new("HA'", "HB", 0.35), new("HA", "HA'", 2.2), new("HB", "HB'", 2.6)]);

    public static readonly IReadOnlyList<IReadOnlyList<string>> AaBbTies =
    [
        ["shift:HA", "shift:HA'"], ["shift:HB", "shift:HB'"], ["j:HA-HB", "j:HA'-HB'"], ["j:HA-HB'", "j:HA'-HB"],
    ];

    /// <summary>Invented ABX (CH2 next to a stereocentre) at 100 MHz.</summary>
    public static SpinSystem Abx() => SpinSystem.Create(new FieldMHz(100),
        [new("HA", 2.74), new("HB", 2.61), new("HX", 4.08)],
        [new("HA", "HB", -16.4), new("HA", "HX", 4.7), new("HB", "HX", 8.9)]);

    /// <summary>
    /// A synthetic measured trace of <paramref name="system"/>: Lorentzian lines, seeded Gaussian noise (fraction of the
    /// tallest point). With a phase error, each point is turned by the phase at its own frequency,
    /// φ(δ) = <paramref name="phaseDeg"/> + <paramref name="phaseDegPerPpm"/> (δ - <paramref name="pivotPpm"/>), as a
    /// spectrometer's first-order phase error does (not line by line, as the fit model draws it).
    /// </summary>
    public static SpectrumTrace Synthetic(SpinSystem system, double widthHz, int points, double noiseFraction, int seed, double phaseDeg = 0,
        double phaseDegPerPpm = 0, double pivotPpm = 0)
    {
        var lines = SpectrumEngine.Compute(system);
        var settings = new SimulationSettings(new WidthHz(widthHz), Lineshape.Lorentzian, Points: points);
        var simulated = SpectrumSimulator.Simulate(system, lines, settings);
        var y = simulated.Trace.Intensity.ToArray();
        if (phaseDeg != 0 || phaseDegPerPpm != 0)
        {
            // Sums of Lorentzian absorption and dispersion profiles, combined with the phase at each point.
            var render = SpectrumSimulator.RenderLines(system, lines, new WidthHz(widthHz));
            for (var i = 0; i < y.Length; i++)
            {
                var hz = simulated.Grid.HzAt(i);
                var phase = (phaseDeg + phaseDegPerPpm * (simulated.Trace.ShiftPpm[i] - pivotPpm)) * Math.PI / 180;
                double absorption = 0, dispersion = 0;
                foreach (var l in render)
                {
                    var dx = hz - l.CentreHz;
                    var h = l.FwhmHz / 2;
                    absorption += l.Area / Math.PI * h / (dx * dx + h * h);
                    dispersion += l.Area / Math.PI * dx / (dx * dx + h * h);
                }
                y[i] = absorption * Math.Cos(phase) - dispersion * Math.Sin(phase);
            }
        }
        if (noiseFraction > 0) NoiseGenerator.AddGaussian(y, noiseFraction * y.Max(), seed);
        return new SpectrumTrace(simulated.Trace.ShiftPpm.ToArray(), y, simulated.Trace.ObserveMHz, "1H",
            TraceOrigin.Describe("synthetic test trace (invented values)"));
    }

    public static SpectrumFitProblem Problem(SpinSystem start, SpectrumTrace trace, FitSetup setup, double widthHz) =>
        setup.Problem(start, [trace], widthHz, Lineshape.Lorentzian);

    /// <summary>The system with every shift moved by the given Hz and every coupling scaled.</summary>
    public static SpinSystem Perturbed(SpinSystem system, Func<int, double> shiftHz, Func<int, double> couplingFactor) =>
        SpinSystem.Create(system.Field,
            system.Nuclei.Select((n, i) => n with { Shift = new ShiftPpm(n.Shift.Value + shiftHz(i) / system.Field.Value) }),
            system.Couplings.Select((c, i) => c with { J = new CouplingHz(c.J.Value * couplingFactor(i)) }), system.Title);
}
