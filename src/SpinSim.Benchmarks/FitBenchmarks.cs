using BenchmarkDotNet.Attributes;
using SpinSim.Core.Engine;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;

namespace SpinSim.Benchmarks;

/// <summary>
/// Fits of synthetic traces (invented values, 16,384 points, 0.5 % noise) from starts a few Hz and ten per cent off:
/// an AA'BB' ring (6 spin parameters with the halves tied), the demo's ABX (its invented true values) and, in
/// <see cref="LargeFitBenchmarks"/>, an 8-spin fragment with a methyl group. One start (the cost of one search with
/// continuation) and the default search (8 starts), each with the relative-sign search (the default) and without it
/// (<c>--signs-as-given</c>): issue 18's budget is at most twice the time for clusters of up to 4 couplings (the AA'BB'
/// and ABX cases).
/// </summary>
[MemoryDiagnoser]
public class FitBenchmarks : FitBenchmarkBase
{
    [Params("aabb", "abx")]
    public string Case { get; set; } = "aabb";

    protected override string CaseName => Case;
}

/// <summary>The 8-spin fragment, whose 7 couplings form one sign group beyond the exhaustive limit: its own class, as a
/// run with the sign search takes tens of seconds.</summary>
[MemoryDiagnoser]
public class LargeFitBenchmarks : FitBenchmarkBase
{
    protected override string CaseName => "eight-spins";
}

/// <summary>The set-up and the fit shared by <see cref="FitBenchmarks"/> and <see cref="LargeFitBenchmarks"/>.</summary>
public abstract class FitBenchmarkBase
{
    protected abstract string CaseName { get; }

    [Params(1, 8)]
    public int Starts { get; set; }

    [Params(true, false)]
    public bool SignSearch { get; set; }

    private SpectrumFitProblem _problem = null!;

    [GlobalSetup]
    public void Setup()
    {
        var truth = CaseName switch { "aabb" => AaBb(), "abx" => Abx(), _ => EightSpins() };
        var trace = Synthetic(truth, 0.7, 16384, 0.005, 1);
        var start = SpinSystem.Create(truth.Field,
            truth.Nuclei.Select((n, i) => n with { Shift = new ShiftPpm(n.Shift.Value + (i % 2 == 0 ? 3.0 : -3.0) / truth.Field.Value) }),
            truth.Couplings.Select((c, i) => c with { J = new CouplingHz(c.J.Value * (i % 2 == 0 ? 1.1 : 0.9)) }));
        var setup = CaseName == "aabb"
            ? new FitSetup { Ties = [["shift:HA", "shift:HA'"], ["shift:HB", "shift:HB'"], ["j:HA-HB", "j:HA'-HB'"], ["j:HA-HB'", "j:HA'-HB"]] }
            : new FitSetup();
        _problem = (setup with { Regions = [new PpmRange(trace.ShiftPpm.Max(), trace.ShiftPpm.Min())] }).Problem(start, [trace], 0.8, Lineshape.Lorentzian);
    }

    [Benchmark]
    public double Fit() => SpectrumFitter.Fit(_problem, new SpectrumFitOptions(Starts: Starts, SignSearch: SignSearch)).Rms;

    /// <summary>The demo's invented ABX at 100 MHz (Cli/Demo/truth-abx.toml).</summary>
    public static SpinSystem Abx() => SpinSystem.Create(new FieldMHz(100),
        [new("HA", 2.762), new("HB", 2.598), new("HX", 4.085)],
        [new("HA", "HB", -16.1), new("HA", "HX", 4.4), new("HB", "HX", 9.3)]);

    /// <summary>Invented AA'BB' ring at 80 MHz.</summary>
    public static SpinSystem AaBb() => SpinSystem.Create(new FieldMHz(80),
        [new("HA", 7.34), new("HA'", 7.34), new("HB", 7.08), new("HB'", 7.08)],
        [new("HA", "HB", 8.6), new("HA'", "HB'", 8.6), new("HA", "HB'", 0.35), new("HA'", "HB", 0.35), new("HA", "HA'", 2.2), new("HB", "HB'", 2.6)]);

    /// <summary>Invented 8-spin fragment at 100 MHz: CH3-CH(X)-CH2(diastereotopic)-CH=CH, strongly coupled in places.</summary>
    public static SpinSystem EightSpins() => SpinSystem.Create(new FieldMHz(100),
        [new("Me", 1.18, 3), new("CH", 2.45), new("Ha", 1.72), new("Hb", 1.61), new("Hv", 5.78), new("Ht", 5.05)],
        [new("Me", "CH", 6.9), new("CH", "Ha", 7.8), new("CH", "Hb", 5.9), new("Ha", "Hb", -13.7), new("Ha", "Hv", 6.8), new("Hb", "Hv", 7.3),
         new("Hv", "Ht", 17.0)]);

    private static SpectrumTrace Synthetic(SpinSystem system, double widthHz, int points, double noise, int seed)
    {
        var simulated = SpectrumSimulator.Simulate(system, SpectrumEngine.Compute(system), new SimulationSettings(new WidthHz(widthHz), Lineshape.Lorentzian, Points: points));
        var y = simulated.Trace.Intensity.ToArray();
        NoiseGenerator.AddGaussian(y, noise * y.Max(), seed);
        return new SpectrumTrace(simulated.Trace.ShiftPpm.ToArray(), y, simulated.Trace.ObserveMHz, "1H", TraceOrigin.Describe("synthetic benchmark trace"));
    }
}
