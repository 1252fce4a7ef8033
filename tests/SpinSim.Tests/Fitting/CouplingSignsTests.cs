using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Fitting;

/// <summary>Which couplings' signs the search tries, and how optima are judged. Systems are invented.</summary>
public class CouplingSignsTests
{
    private static SpinSystem Abx(double field) => SpinSystem.Create(new FieldMHz(field),
        [new Nucleus("A", 3.10), new Nucleus("B", 2.95), new Nucleus("X", 4.40)],
        [new Coupling("A", "B", -14.0), new Coupling("A", "X", 7.5), new Coupling("B", "X", -2.0)]);

    private static HashSet<int> All(SpinSystem s) => Enumerable.Range(0, s.Couplings.Count).ToHashSet();

    [Fact]
    public void AbxAt60MHzIsOneGroupOfThree()
    {
        // A and B are strongly coupled (|J/dnu| = 14/9 > 0.05); both X couplings touch that cluster.
        var s = Abx(60);
        var groups = CouplingSigns.Groups(s, All(s));
        Assert.Single(groups);
        Assert.Equal([0, 1, 2], groups[0].Couplings);
        // 2^(3-1) patterns less the identity, the first coupling never flipped.
        var patterns = CouplingSigns.Patterns(groups[0]);
        Assert.Equal(3, patterns.Count);
        Assert.DoesNotContain(patterns, p => p.Contains(0));
    }

    [Fact]
    public void FirstOrderAmxHasNoGroup()
    {
        // Every |dnu/J| above 20 at 400 MHz: no strongly coupled cluster, so no sign can matter.
        var s = SpinSystem.Create(new FieldMHz(400), [new Nucleus("A", 7.2), new Nucleus("M", 5.9), new Nucleus("X", 4.1)],
            [new Coupling("A", "M", 10.5), new Coupling("A", "X", 1.2), new Coupling("M", "X", -3.5)]);
        Assert.Empty(CouplingSigns.Groups(s, All(s)));
        var verdicts = CouplingSigns.Judge(s, All(s), [], [new SignOptimum([1, 1, -1], 1.0)], 1000, 6);
        Assert.All(verdicts, v => Assert.False(v.Determined));
        Assert.All(verdicts, v => Assert.Contains("weakly coupled", v.Reason));
    }

    [Fact]
    public void LargeGroupsGetSingleAndPairFlips()
    {
        var group = new SignGroup(Enumerable.Range(0, 8).ToArray());
        var patterns = CouplingSigns.Patterns(group);
        Assert.Equal(8 + 28, patterns.Count);
    }

    [Fact]
    public void JudgeFindsTheAbxRelativeSignOfTheXCouplingsOnly()
    {
        // In ABX only the relative sign of J_AX and J_BX shows: reversing J_AB alone gives the same spectrum (exactly with
        // X of another isotope, see the test below; to first order in J/dnu_AX otherwise). Optima as a search would return them:
        // the truth and its J_AB-reversed twin at the same misfit, the two patterns with J_AX J_BX reversed far worse.
        var s = Abx(60);
        var optima = new[]
        {
            new SignOptimum([-1, 1, -1], 1.000),
            new SignOptimum([1, 1, -1], 1.0001),
            new SignOptimum([-1, 1, 1], 1.30),
            new SignOptimum([1, 1, 1], 1.31),
        };
        var verdicts = CouplingSigns.Judge(s, All(s), CouplingSigns.Groups(s, All(s)), optima, 5000, 9);
        Assert.False(verdicts[0].Determined);
        Assert.True(verdicts[1].Determined);
        Assert.Equal([2], verdicts[1].RelativeTo);
        Assert.Equal(1.30, verdicts[1].MisfitRatio, 9);
        Assert.True(verdicts[1].Probability < 1e-6);
        Assert.True(verdicts[2].Determined);
        Assert.Equal([1], verdicts[2].RelativeTo);
    }

    [Fact]
    public void ReversingJabAloneLeavesAnAbxWithFluorineUnchanged()
    {
        // Exact invariant checked on the engine: the AB part is two AB quartets whose effective shift differences are
        // dnu +- (J_AX - J_BX)/2 (Bernstein, Pople & Schneider, Can. J. Chem. 35, 65, 1957), and an AB quartet does not
        // depend on the sign of J_AB. So the sign of J_AB relative to the X couplings cannot show.
        SpinSystem With(double jab) => SpinSystem.Create(new FieldMHz(60),
            [new Nucleus("A", 3.10), new Nucleus("B", 2.95), new Nucleus("X", -120.0, 1, Isotope.F19)],
            [new Coupling("A", "B", jab), new Coupling("A", "X", 7.5), new Coupling("B", "X", -2.0)]);
        var options = new SpinSim.Core.Engine.EngineOptions(RelativeIntensityFloor: 1e-14);
        var a = SpinSim.Core.Engine.SpectrumEngine.Compute(With(-14), options).Lines.Where(l => l.Intensity > 1e-9).ToList();
        var b = SpinSim.Core.Engine.SpectrumEngine.Compute(With(14), options).Lines.Where(l => l.Intensity > 1e-9).ToList();
        Assert.Equal(a.Count, b.Count);
        for (var k = 0; k < a.Count; k++)
        {
            Assert.Equal(a[k].FrequencyHz, b[k].FrequencyHz, 9);
            Assert.Equal(a[k].Intensity, b[k].Intensity, 9);
        }
    }
}
