using SpinSim.Core.Engine;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;
using static SpinSim.Tests.Fitting.SpectrumFitTestData;

namespace SpinSim.Tests.Fitting;

public class SpectrumFitTests
{
    private static double[] Trace(SpinSystem system) =>
        SpectrumSimulator.Simulate(system, SpectrumEngine.Compute(system, new EngineOptions(RelativeIntensityFloor: 1e-14)),
            new SimulationSettings(new WidthHz(0.5), Lineshape.Lorentzian, 7.8, 6.6, 8192)).Trace.Intensity.ToArray();

    private static void AssertSameTrace(double[] a, double[] b)
    {
        var max = a.Max();
        for (var i = 0; i < a.Length; i++) Assert.True(Math.Abs(a[i] - b[i]) <= 1e-9 * max, $"point {i}: {a[i]} vs {b[i]}");
    }

    [Fact]
    public void AbSpectrumIsTheSameForEitherSignOfJ()
    {
        // Exact invariant checked against the engine: the AB quartet depends on J only through |J|
        // (Pople, Schneider & Bernstein 1959 closed form: lines at nu0 +- (D +- J)/2, intensities 1 -+ J/D swap with the sign).
        var plus = SpinSystem.Create(new FieldMHz(80), [new("A", 7.30), new("B", 7.15)], [new("A", "B", 8.0)]);
        var minus = plus.WithCouplings([new("A", "B", -8.0)]);
        AssertSameTrace(Trace(plus), Trace(minus));
    }

    [Fact]
    public void AaBbSpectrumIsTheSameWithTheKnownExchanges()
    {
        // Exact invariant checked against the engine: exchanging J_AA' with J_BB', or J_AB with J_AB', leaves the AA'BB'
        // spectrum unchanged (it depends on K = J_AA' + J_BB', N = J_AB + J_AB' and on M and L only through M^2, L^2;
        // McConnell, McLean & Reilly, J. Chem. Phys. 23, 1152, 1955 for the AA'XX' case).
        var system = AaBb();
        var swapAaBb = system.WithCouplings([new("HA", "HB", 8.6), new("HA'", "HB'", 8.6), new("HA", "HB'", 0.35), new("HA'", "HB", 0.35), new("HA", "HA'", 2.6), new("HB", "HB'", 2.2)]);
        var swapAbAbPrime = system.WithCouplings([new("HA", "HB", 0.35), new("HA'", "HB'", 0.35), new("HA", "HB'", 8.6), new("HA'", "HB", 8.6), new("HA", "HA'", 2.2), new("HB", "HB'", 2.6)]);
        var reference = Trace(system);
        AssertSameTrace(reference, Trace(swapAaBb));
        AssertSameTrace(reference, Trace(swapAbAbPrime));
    }

    [Fact]
    public void FitOfAnAbSystemWarnsThatTheSignOfJIsUndetermined()
    {
        var truth = SpinSystem.Create(new FieldMHz(80), [new("A", 7.30), new("B", 7.15)], [new("A", "B", 8.0)]);
        var trace = Synthetic(truth, 0.6, 4096, 0.002, 5);
        var result = SpectrumFitter.Fit(Problem(truth, trace, new FitSetup(), 0.6), new SpectrumFitOptions(Starts: 1));
        Assert.True(result.Converged, result.StopReason);
        Assert.Contains(result.Warnings, w => w.Contains("sign of j:A-B cannot be determined"));
    }

    [Fact]
    public void FitOfAnAaBbSystemReportsTheExchangeAmbiguities()
    {
        var truth = AaBb();
        var trace = Synthetic(truth, 0.7, 4096, 0.002, 6);
        var result = SpectrumFitter.Fit(Problem(truth, trace, new FitSetup { Ties = AaBbTies }, 0.7), new SpectrumFitOptions(Starts: 1));
        Assert.Contains(result.Warnings, w => w.Contains("j:HA-HA'") && w.Contains("j:HB-HB'") && w.Contains("exchanged"));
        Assert.Contains(result.Warnings, w => w.Contains("j:HA-HB ") && w.Contains("j:HA-HB'") && w.Contains("exchanged"));
    }

    public static IEnumerable<object[]> PoorStarts()
    {
        foreach (var system in new[] { "aabb", "abx" })
            foreach (var (a, b, f) in new[] { (20.0, -20.0, 1.3), (-20.0, 20.0, 0.7), (20.0, 20.0, 0.7), (-15.0, 10.0, 1.3) })
                yield return [system, a, b, f];
    }

    [Theory]
    [MemberData(nameof(PoorStarts))]
    public void PoorStartsReachTheTrueOptimum(string which, double shiftAHz, double shiftBHz, double couplingFactor)
    {
        // Invented data: traces simulated from known values plus 0.5 % noise; starts off by up to 20 Hz in the shifts
        // and 30 % in the couplings (alternately high and low) must end at the optimum of the true start.
        var truth = which == "aabb" ? AaBb() : Abx();
        var setup = which == "aabb" ? new FitSetup { Ties = AaBbTies } : new FitSetup();
        var trace = Synthetic(truth, 0.7, 8192, 0.005, 11);
        var start = Perturbed(truth, i => which == "aabb" ? (i < 2 ? shiftAHz : shiftBHz) : i switch { 0 => shiftAHz, 1 => shiftBHz, _ => -shiftAHz / 2 },
            i => i % 2 == 0 ? couplingFactor : 2 - couplingFactor);
        var fromTruth = SpectrumFitter.Fit(Problem(truth, trace, setup, 0.7) with { }, new SpectrumFitOptions(Starts: 1, Continuation: false));
        var regions = fromTruth.Traces.Count > 0 ? Problem(truth, trace, setup, 0.7).Data[0].Regions : null;
        var fromPoor = SpectrumFitter.Fit(Problem(start, trace, setup with { Regions = regions }, 1.0));
        Assert.True(fromPoor.Converged, fromPoor.StopReason);
        Assert.True(fromPoor.Rms <= fromTruth.Rms * (1 + 1e-3), $"rms {fromPoor.Rms} vs {fromTruth.Rms} from the true start");
        // AA'BB' is symmetric under relabelling A with B (with J_AA' and J_BB' exchanged): compare the shifts as a set.
        var expected = fromTruth.Parameters.Where(p => p.Kind == ParameterKind.ShiftPpm).Select(p => p.Value).Order().ToArray();
        var actual = fromPoor.Parameters.Where(p => p.Kind == ParameterKind.ShiftPpm).Select(p => p.Value).Order().ToArray();
        for (var k = 0; k < expected.Length; k++) Assert.Equal(expected[k], actual[k], 1e-4);
    }

    /// <summary>
    /// Joining starts is a saving, not a change of answer: from poor starts, the fit with joining ends where the fit
    /// in which every start runs every stage ends (exact invariant up to the convergence tolerance).
    /// </summary>
    [Theory]
    [InlineData("abx")]
    [InlineData("aabb")]
    public void JoinedStartsEndWhereSeparateStartsEnd(string which)
    {
        var truth = which == "aabb" ? AaBb() : Abx();
        var setup = which == "aabb" ? new FitSetup { Ties = AaBbTies } : new FitSetup();
        var trace = Synthetic(truth, 0.7, 8192, 0.005, 11);
        var start = Perturbed(truth, i => i % 2 == 0 ? 12 : -9, i => i % 2 == 0 ? 1.2 : 0.8);
        var problem = Problem(start, trace, setup, 1.0);
        var joined = SpectrumFitter.Fit(problem);
        var separate = SpectrumFitter.Fit(problem, new SpectrumFitOptions(JoinStarts: false));
        Assert.True(joined.StartsJoined > 0, "no start joined another: the comparison would show nothing");
        Assert.Equal(0, separate.StartsJoined);
        Assert.Equal(separate.Rms, joined.Rms, 1e-9);
        Assert.Equal(separate.StartsAtBest, joined.StartsAtBest);
        // AA'BB' has two optima that give the same spectrum with J_AA' and J_BB' exchanged (McConnell, McLean & Reilly,
        // J. Chem. Phys. 23, 1152, 1955: the spectrum depends on K = J_AA' + J_BB' and on M = J_AA' - J_BB' only through
        // M^2); either run may end on either, so those two are compared as a pair.
        double[] Exchangeable(SpectrumFitResult r) => r.Parameters.Where(p => p.Name is "j:HA-HA'" or "j:HB-HB'").Select(p => p.Value).Order().ToArray();
        Assert.Equal(Exchangeable(separate), Exchangeable(joined), (x, y) => Math.Abs(x - y) <= 1e-6);
        foreach (var (a, b) in separate.Parameters.Zip(joined.Parameters).Where(t => t.First.Name is not ("j:HA-HA'" or "j:HB-HB'")))
            Assert.True(Math.Abs(a.Value - b.Value) <= 1e-3 * a.StdError + 1e-12, $"{a.Name}: {a.Value} separately, {b.Value} joined");
    }

    /// <summary>
    /// Widths per nucleus follow each line's origin, which the engine's line derivatives do not carry, so this fit runs
    /// on the differenced Jacobian: invented ABX with the X lines broader, recovered within 3 standard errors.
    /// </summary>
    [Fact]
    public void WidthsPerNucleusAreRecoveredWithTheDifferencedJacobian()
    {
        var truth = Abx();
        var broadX = truth.WithNuclei(truth.Nuclei.Select(n => n.Id == "HX" ? n with { Width = new WidthHz(1.6) } : n));
        var trace = Synthetic(broadX, 0.6, 8192, 0.005, 31);
        var result = SpectrumFitter.Fit(Problem(Perturbed(truth, i => 2.0, i => 1.05), trace, new FitSetup { PerNucleusWidth = true }, 0.9),
            new SpectrumFitOptions(Starts: 2));
        Assert.True(result.Converged, result.StopReason);
        foreach (var (id, width) in new[] { ("HA", 0.6), ("HB", 0.6), ("HX", 1.6) })
        {
            var p = result.Parameters.Single(q => q.Name == $"linewidth:{id}");
            Assert.True(Math.Abs(p.Value - width) <= 3 * p.StdError, $"{p.Name}: {p.Value} +- {p.StdError}, true {width}");
        }
        foreach (var (p, n) in result.Parameters.Where(q => q.Kind == ParameterKind.ShiftPpm).Zip(truth.Nuclei))
            Assert.True(Math.Abs(p.Value - n.Shift.Value) <= 3 * p.StdError, $"{p.Name}: {p.Value} +- {p.StdError}, true {n.Shift.Value}");
    }

    [Fact]
    public void TrueValuesLieWithinThreeStandardErrors()
    {
        // Invented data with known truth: ABX at 100 MHz with 1 % noise.
        var truth = Abx();
        var trace = Synthetic(truth, 0.6, 8192, 0.01, 21);
        var result = SpectrumFitter.Fit(Problem(Perturbed(truth, i => 3.0, i => 1.05), trace, new FitSetup(), 0.8), new SpectrumFitOptions(Starts: 2));
        Assert.True(result.Converged, result.StopReason);
        foreach (var p in result.Parameters.Where(p => p.Kind is ParameterKind.ShiftPpm or ParameterKind.JHz))
        {
            var expected = p.Kind == ParameterKind.ShiftPpm
                ? truth.Nuclei.Single(n => n.Id == p.Nuclei[0]).Shift.Value
                : truth.Couplings.Single(c => c.A == p.Nuclei[0] && c.B == p.Nuclei[1]).J.Value;
            Assert.True(Math.Abs(p.Value - expected) <= 3 * p.StdError, $"{p.Name}: {p.Value} +- {p.StdError}, true {expected}");
        }
        Assert.Equal(0.6, result.Parameters.Single(p => p.Name == "linewidth").Value, 0.02);
    }

    [Fact]
    public void StandardErrorsAgreeWithTheScatterOverManyNoiseDraws()
    {
        // Invented data: 200 noise draws of one ABX trace; for white noise the linearised standard errors
        // (s^2 (J^T J)^-1, science notes) must match the observed scatter of the estimates within 25 %.
        var truth = Abx();
        var clean = Synthetic(truth, 0.8, 2048, 0, 0);
        var regions = FitSetup.DefaultRegions(truth, 100, 0.8);
        var names = new[] { "shift:HA", "shift:HB", "shift:HX", "j:HA-HB", "j:HA-HX", "j:HB-HX" };
        var estimates = names.ToDictionary(n => n, _ => new List<double>());
        var errors = names.ToDictionary(n => n, _ => new List<double>());
        for (var draw = 0; draw < 200; draw++)
        {
            var y = clean.Intensity.ToArray();
            SpinSim.Core.Spectrum.NoiseGenerator.AddGaussian(y, 0.01 * y.Max(), 1000 + draw);
            var trace = new SpinSim.Core.Traces.SpectrumTrace(clean.ShiftPpm.ToArray(), y, 100, "1H", clean.Origin);
            // The linearised errors describe one optimum: no sign search, which may land a rare draw on the sign variant
            // that the noise happens to favour (the variants differ by more than the noise in the other couplings).
            var result = SpectrumFitter.Fit(Problem(truth, trace, new FitSetup { Regions = regions }, 0.8),
                new SpectrumFitOptions(Starts: 1, Continuation: false, SignSearch: false));
            foreach (var n in names)
            {
                var p = result.Parameters.Single(q => q.Name == n);
                estimates[n].Add(p.Value);
                errors[n].Add(p.StdError);
            }
        }
        foreach (var n in names)
        {
            var mean = estimates[n].Average();
            var scatter = Math.Sqrt(estimates[n].Sum(v => (v - mean) * (v - mean)) / (estimates[n].Count - 1));
            var stated = errors[n].Average();
            Assert.True(Math.Abs(stated / scatter - 1) <= 0.25, $"{n}: stated {stated:E3}, scatter {scatter:E3}");
        }
    }

    [Fact]
    public void PhaseErrorAndFrequencyOffsetAreRecovered()
    {
        var truth = Abx();
        var shifted = Synthetic(truth, 0.7, 8192, 0.003, 31, phaseDeg: 6);
        var offsetTrace = new SpinSim.Core.Traces.SpectrumTrace(shifted.ShiftPpm.Select(p => p + 1.5 / 100).ToArray(), shifted.Intensity.ToArray(), 100, "1H", shifted.Origin);
        var setup = new FitSetup { FitPhase = true, FitOffset = true, Fix = ["shift:*"] };
        var result = SpectrumFitter.Fit(Problem(truth, offsetTrace, setup, 0.7), new SpectrumFitOptions(Starts: 1));
        Assert.True(result.Converged, result.StopReason);
        Assert.Equal(6.0, result.Parameters.Single(p => p.Name == "phase_deg").Value, 0.3);
        Assert.Equal(1.5, result.Parameters.Single(p => p.Name == "offset_hz").Value, 0.02);
    }

    [Fact]
    public void JointFitAtTwoFieldsSharesShiftsAndCouplings()
    {
        var truth = AaBb();
        var benchtop = Synthetic(truth.WithField(new FieldMHz(60)), 0.8, 8192, 0.005, 41);
        var highField = Synthetic(truth.WithField(new FieldMHz(400)), 0.5, 8192, 0.005, 42);
        var start = Perturbed(truth, i => i < 2 ? 5 : -5, i => 1.1);
        var setup = new FitSetup { Ties = AaBbTies };
        var data = new[] { benchtop, highField }.Select(t => new FitDataset(t, FitSetup.DefaultRegions(start, t.ObserveMHz!.Value, 1.0), [])).ToList();
        var problem = new SpectrumFitProblem(start, data, setup.BuildParameters(start, 2, 1.0), setup.Ties, Lineshape.Lorentzian);
        var result = SpectrumFitter.Fit(problem, new SpectrumFitOptions(Starts: 2));
        Assert.True(result.Converged, result.StopReason);
        Assert.Equal(2, result.Traces.Count);
        Assert.Contains(result.Parameters, p => p.Name == "scale@2");
        Assert.Equal(7.34, result.Parameters.Single(p => p.Name == "shift:HA").Value, 1e-3);
        Assert.Equal(8.6, result.Parameters.Single(p => p.Name == "j:HA-HB").Value, 0.05);
    }

    [Fact]
    public void AStoppedFitKeepsItsBestPoint()
    {
        var truth = Abx();
        var trace = Synthetic(truth, 0.7, 4096, 0.005, 51);
        using var cancel = new CancellationTokenSource();
        var reports = 0;
        var progress = new Progress(() => { if (++reports == 3) cancel.Cancel(); });
        var result = SpectrumFitter.Fit(Problem(Perturbed(truth, i => 8, i => 1.2), trace, new FitSetup(), 0.7),
            new SpectrumFitOptions(Starts: 1, Progress: progress, Cancel: cancel.Token));
        Assert.True(result.Stopped);
        Assert.False(result.Converged);
        Assert.All(result.Parameters, p => Assert.True(double.IsFinite(p.Value)));
        Assert.Contains(result.Warnings, w => w.Contains("stopped"));
    }

    private sealed class Progress(Action onReport) : IProgress<FitProgress>
    {
        public void Report(FitProgress value) => onReport();
    }
}
