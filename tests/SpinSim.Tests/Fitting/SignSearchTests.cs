using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Units;
using static SpinSim.Tests.Fitting.SpectrumFitTestData;

namespace SpinSim.Tests.Fitting;

/// <summary>
/// The relative-sign search on synthetic spectra of invented systems: from starts with the wrong relative signs the fit
/// must come back to the truth's, and say which signs the spectrum determines.
/// </summary>
public class SignSearchTests
{
    /// <summary>ABX at 60 MHz (invented): A 3.10, B 2.95, X 4.40 ppm; J(A,B) = -14.0, J(A,X) = +7.5, J(B,X) = -2.0 Hz.</summary>
    private static SpinSystem AbxTruth() => SpinSystem.Create(new FieldMHz(60),
        [new("A", 3.10), new("B", 2.95), new("X", 4.40)],
        [new("A", "B", -14.0), new("A", "X", 7.5), new("B", "X", -2.0)]);

    private static SpinSystem AllPositive(SpinSystem s, double shiftA) => SpinSystem.Create(s.Field,
        s.Nuclei.Select(n => n.Id == "A" ? n with { Shift = new ShiftPpm(shiftA) } : n),
        s.Couplings.Select(c => c with { J = new CouplingHz(Math.Abs(c.J.Value)) }), s.Title);

    private static readonly FitSetup AbxRegions = new() { Regions = [new PpmRange(4.7, 4.1), new PpmRange(3.5, 2.6)] };

    [Theory]
    [InlineData(0.0)]
    [InlineData(0.005)]
    public void AbxFromAllPositiveStartsRecoversTheRelativeSigns(double noise)
    {
        var truth = AbxTruth();
        var trace = Synthetic(truth, 0.8, 16384, noise, 4);
        var fromTruth = SpectrumFitter.Fit(Problem(truth, trace, AbxRegions, 0.8), new SpectrumFitOptions(SignSearch: false));
        var result = SpectrumFitter.Fit(Problem(AllPositive(truth, 3.08), trace, AbxRegions, 0.8));
        Assert.True(result.Converged, result.StopReason);

        // The relative signs as in the truth, up to the overall sign that no spectrum shows.
        var j = result.FittedSystem.Couplings.Select(c => c.J.Value).ToArray();
        var overall = Math.Sign(j[1]) * Math.Sign(7.5);
        var tolerance = noise == 0 ? 0.01 : 0.05;
        Assert.Equal(-14.0 * overall, j[0], tolerance);
        Assert.Equal(7.5 * overall, j[1], tolerance);
        Assert.Equal(-2.0 * overall, j[2], tolerance);
        // rms equal to the fit started from the truth within 0.1 % (the criterion).
        Assert.True(result.Rms <= fromTruth.Rms * 1.001 + 1e-12, $"rms {result.Rms} vs {fromTruth.Rms} from the truth");

        var signs = result.Solutions!.Signs.ToDictionary(s => s.Parameter);
        Assert.True(signs["j:A-X"].Determined, signs["j:A-X"].Reason);
        Assert.Contains("j:B-X", signs["j:A-X"].RelativeTo);
        Assert.True(signs["j:B-X"].Determined);
        Assert.True(result.Solutions.SignPatternsTried >= 3);

        // The shared table (text, HTML, figure) carries each coupling's verdict, and nothing on the other rows.
        var rows = SpinSim.Core.Reporting.FitTable.Rows(result);
        Assert.Equal("determined", rows.Single(r => r.Label.StartsWith("J(A,X)", StringComparison.Ordinal)).Sign);
        Assert.All(rows.Where(r => r.Label.StartsWith('δ')), r => Assert.Equal("", r.Sign));
    }

    /// <summary>
    /// Reversing every coupling leaves a spectrum as it is (common practice, no source): checked here on the misfit
    /// itself, and relied on by the fitter, which lets a start on another start's mirror path share its mirrored outcome
    /// rather than run the remaining stages again. With one coupling held the reversal is no symmetry, and no start joins
    /// that way.
    /// </summary>
    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void A_start_on_the_mirror_path_of_another_shares_its_mirrored_outcome(bool holdOneCoupling)
    {
        var truth = AbxTruth();
        var trace = Synthetic(truth, 0.8, 16384, 0.005, 4);
        var setup = holdOneCoupling ? AbxRegions with { Fix = ["j:B-X"] } : AbxRegions;
        var search = new SpectrumFitter.Search(Problem(AllPositive(truth, 3.08), trace, setup, 0.8), new SpectrumFitOptions());
        var layout = search.Layout;
        bool IsCoupling(int f) => layout.Parameters[layout.FreeRepresentatives[f]].Kind == ParameterKind.JHz;
        var x = search.Aligned(search.GivenStart);
        var image = x.Select((v, f) => IsCoupling(f) ? -v : v).ToArray();

        var (optima, joined) = search.RunStarts([new FitStart(x, "start"), new FitStart(image, "its mirror image")]);

        if (holdOneCoupling)
        {
            Assert.Equal(0, joined);
            return;
        }
        Assert.Equal(1, joined);
        var (a, b) = (optima[0].Free, optima[1].Free);
        for (var f = 0; f < a.Length; f++) Assert.Equal(IsCoupling(f) ? -a[f] : a[f], b[f]);
        Assert.Equal(optima[0].Cost, optima[1].Cost);
        Assert.Equal(search.Cost(a), search.Cost(b), 1e-10 * search.Cost(a));
    }

    [Fact]
    public void AllylicSignIsRecoveredAndReportedRelativeToTheVicinal()
    {
        // CH3-CH=CH- at 60 MHz (invented values): the vinyl pair is strongly coupled; allylic 4J negative, vicinal 3J
        // positive (the usual relative sign, common practice, no source).
        var truth = SpinSystem.Create(new FieldMHz(60),
            [new("Ha", 5.62), new("Hb", 5.44), new Nucleus("CH3", 1.68, 3)],
            [new("Ha", "Hb", 15.3), new("Ha", "CH3", 6.6), new("Hb", "CH3", -1.7)]);
        var start = truth.WithCouplings(truth.Couplings.Select(c => c with { J = new CouplingHz(Math.Abs(c.J.Value)) }));
        var trace = Synthetic(truth, 0.9, 16384, 0.003, 11);
        var result = SpectrumFitter.Fit(Problem(start, trace, new FitSetup(), 0.9));
        var j = result.FittedSystem.Couplings.Select(c => c.J.Value).ToArray();
        var overall = Math.Sign(j[1]);
        Assert.Equal(15.3 * overall, j[0], 0.05);
        Assert.Equal(6.6 * overall, j[1], 0.05);
        Assert.Equal(-1.7 * overall, j[2], 0.05);
        var allylic = result.Solutions!.Signs.Single(s => s.Parameter == "j:Hb-CH3");
        Assert.True(allylic.Determined, allylic.Reason);
        Assert.Contains("j:Ha-CH3", allylic.RelativeTo);
        Assert.True(allylic.MisfitRatio > 1.01);
    }

    [Fact]
    public void ASignTheSpectrumDoesNotDecideKeepsTheStartsSign()
    {
        // CH3-CH=CH- at 60 MHz (invented values) fitted over the vinyl H only: the AB part of an ABX3 does not decide the
        // sign of J(A,B) (the ABX analysis, Pople, Schneider & Bernstein 1959, ch. 6), so the report calls it undetermined
        // and the result keeps the sign the user started with rather than whichever the noise favours.
        var truth = SpinSystem.Create(new FieldMHz(60),
            [new("HA", 6.98), new("HB", 5.84), new Nucleus("Me", 1.88, 3)],
            [new("HA", "HB", 15.6), new("HA", "Me", 6.9), new("HB", "Me", -1.7)]);
        var setup = new FitSetup { Regions = [new PpmRange(7.55, 5.55)] };
        foreach (var seed in new[] { 5, 6, 7 })
        {
            var trace = Synthetic(truth, 0.8, 16384, 0.015, seed);
            var result = SpectrumFitter.Fit(Problem(truth, trace, setup, 0.8), new SpectrumFitOptions(Starts: 4));
            var ab = result.Solutions!.Signs.Single(s => s.Parameter == "j:HA-HB");
            Assert.False(ab.Determined, $"seed {seed}: {ab.Reason}");
            Assert.True(result.FittedSystem.Couplings[0].J.Value > 0, $"seed {seed}: J(HA,HB) = {result.FittedSystem.Couplings[0].J.Value}");
        }
    }

    [Fact]
    public void FirstOrderAmxReportsEverySignUndetermined()
    {
        // Every |dnu/J| above 20 at 400 MHz (invented values): the spectrum depends on |J| alone.
        var truth = SpinSystem.Create(new FieldMHz(400), [new("A", 7.20), new("M", 5.90), new("X", 4.10)],
            [new("A", "M", 10.5), new("A", "X", 1.2), new("M", "X", -3.5)]);
        var trace = Synthetic(truth, 0.8, 16384, 0.002, 3);
        var result = SpectrumFitter.Fit(Problem(truth, trace, new FitSetup(), 0.8), new SpectrumFitOptions(Starts: 2));
        Assert.Equal(3, result.Solutions!.Signs.Count);
        Assert.All(result.Solutions.Signs, s => Assert.False(s.Determined));
        Assert.All(result.Solutions.Signs, s => Assert.Contains("weakly coupled", s.Reason));
        Assert.Equal(0, result.Solutions.SignPatternsTried);
        Assert.All(SpinSim.Core.Reporting.FitTable.Rows(result).Where(r => r.Label.StartsWith('J')), r => Assert.Equal("undetermined", r.Sign));
    }

    [Fact]
    public void AbPartAloneReportsBothAbxSolutions()
    {
        // Source: the two-solution ABX analysis (Pople, Schneider & Bernstein 1959, ch. 6). With X = 19F the 1H
        // spectrum is the AB part alone and both solutions give it exactly (AbxAlternativeTests), so a fit must report
        // the other one as an alternative. Invented values.
        var truth = SpinSystem.Create(new FieldMHz(80),
            [new("A", 6.32), new("B", 6.25), new Nucleus("X", -112.0, 1, Isotope.F19)],
            [new("A", "B", 1.8), new("A", "X", 12.4), new("B", "X", 6.9)]);
        var trace = Synthetic(truth, 0.6, 16384, 0.002, 8);
        var setup = new FitSetup { Regions = [new PpmRange(6.45, 6.12)] };
        var result = SpectrumFitter.Fit(Problem(truth, trace, setup, 0.6));
        var second = AbxAlternative.SecondSolution(result.FittedSystem, "A", "B", "X")!;
        var alternative = Assert.Single(result.Solutions!.Alternatives);
        var jax = alternative.Differences.Single(d => d.Name == "j:A-X");
        // Up to the overall sign of the X couplings, which the sign report covers.
        Assert.Equal(Math.Abs(second.Couplings[1].J.Value), Math.Abs(jax.Alternative), 0.05);
        Assert.Contains(result.Warnings, w => w.Contains("distinct solutions"));
    }

    [Fact]
    public void AHeldSignIsKeptAndNotSearched()
    {
        // hold_sign: J(A,X) and J(B,X) keep the signs they start with (one-sided bounds at zero) and the search leaves
        // them alone, so their relative sign stays the wrong one (holding one alone would not do: reversing every other
        // coupling gives the truth's mirror).
        var truth = AbxTruth();
        var trace = Synthetic(truth, 0.8, 8192, 0.005, 4);
        var setup = AbxRegions with { HoldSign = ["j:A-X", "j:B-X"] };
        var result = SpectrumFitter.Fit(Problem(AllPositive(truth, 3.08), trace, setup, 0.8), new SpectrumFitOptions(Starts: 2));
        Assert.True(result.FittedSystem.Couplings[1].J.Value >= 0 && result.FittedSystem.Couplings[2].J.Value >= 0);
        var free = SpectrumFitter.Fit(Problem(AllPositive(truth, 3.08), trace, AbxRegions, 0.8), new SpectrumFitOptions(Starts: 2));
        Assert.True(free.Rms < result.Rms, $"the free search ({free.Rms}) should fit better than the held wrong sign ({result.Rms})");
    }
}
