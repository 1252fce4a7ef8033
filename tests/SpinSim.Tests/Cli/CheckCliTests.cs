using System.Globalization;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Tests.Cli;

/// <summary><c>spinsim check</c>: the cluster plan, the largest block and the splitting error it reports.</summary>
public class CheckCliTests
{
    private const string Large = "large-molecule-40h.toml";

    [Fact]
    public void LargeExampleIsSplitAndEveryClusterIsListedWithItsNucleiAndSize()
    {
        var (code, o, err) = CliTests.Run("check", CliTests.Example(Large));
        Assert.True(code == 0, err);
        // Auto mode: the whole system's largest block is far above 256 states, so it is split at 0.05.
        Assert.Contains("plan             split into 12 clusters joined by |J/dnu| > 0.05 (auto:", o);
        Assert.Contains("  cluster 1: 4 nuclei, largest block 6 states, 2 spectator configurations: HA HA2 HB HB2", o);
        Assert.Contains("  cluster 2: 9 nuclei, largest block 1 state, 1 spectator configuration: tBu", o);
        Assert.Contains("  cluster 6: 4 nuclei, largest block 6 states, 128 spectator configurations: H2a H2b H3 iPrH", o);
        Assert.Contains("  cluster 10: 4 nuclei, largest block 6 states, 4 spectator configurations: H3r H4r H5r H6r", o);
        Assert.Contains("largest block    6 states (cluster 1)", o);

        // Every observed nucleus is in exactly one cluster: the cluster sizes add up to the 40 protons.
        var sizes = o.Split('\n').Where(l => l.StartsWith("  cluster ", StringComparison.Ordinal))
            .Select(l => int.Parse(l.Split(':')[1].Trim().Split(' ')[0], CultureInfo.InvariantCulture)).ToList();
        Assert.Equal(12, sizes.Count);
        Assert.Equal(40, sizes.Sum());
    }

    [Fact]
    public void LargeExampleReportsTheLargestCutRatioAndTheDisplacementEstimate()
    {
        var (code, o, err) = CliTests.Run("check", CliTests.Example(Large));
        Assert.True(code == 0, err);
        // From the file's values at 400 MHz: H3 (1.52 ppm) - H4b (2.51 ppm), J = 9.0 Hz: 9 / 396 = 0.0227.
        Assert.Contains("largest cut |J/dnu| = 0.0227 (H3-H4b: J = 9 Hz, dnu = 396 Hz)", o);
        // iPrH loses the flip-flop terms to both methyls (g = 4 each): 6.8^2 x 4 / (2 x 320) + 6.9^2 x 4 / (2 x 336).
        var expected = 6.8 * 6.8 * 4 / (2 * 320.0) + 6.9 * 6.9 * 4 / (2 * 336.0);
        Assert.Contains($"about {expected.ToString("0.###", CultureInfo.InvariantCulture)} Hz, lines of iPrH", o);
        Assert.Contains("an estimate, not a bound", o);
    }

    [Fact]
    public void SmallSystemIsExactWithNoSplittingError()
    {
        var (code, o, err) = CliTests.Run("check", CliTests.Example("abx-stereocentre.toml"));
        Assert.True(code == 0, err);
        Assert.Contains("plan             exact, the whole system as one cluster (auto: the whole system's largest block has 3 states, at most 256)", o);
        Assert.Contains("  cluster 1: 3 nuclei, largest block 3 states, 1 spectator configuration: HA HB HX", o);
        Assert.Contains("splitting error  none", o);
    }

    [Fact]
    public void ExactOptionPlansOneClusterAndWarnsThatTheLargeExampleWouldBeRefused()
    {
        var (code, o, err) = CliTests.Run("check", CliTests.Example(Large), "--exact");
        Assert.True(code == 0, err);
        Assert.Contains("plan             exact, the whole system as one cluster (--exact)", o);
        Assert.Contains("clusters         1", o);
        Assert.Contains("warning: simulate will refuse this plan", err);
    }

    [Fact]
    public void LowerThresholdJoinsMoreCouplingsIntoFewerLargerClusters()
    {
        var (code, o, err) = CliTests.Run("check", CliTests.Example(Large), "--split-threshold", "0.01");
        Assert.True(code == 0, err);
        // At 0.01 the propanoate ethyl (7.6 / 476 = 0.016) and the isopropyl methyls (6.8 / 320 = 0.021) join their partners.
        Assert.Contains("plan             split into 8 clusters joined by |J/dnu| > 0.01 (--split-threshold 0.01)", o);
        Assert.Contains("12 nuclei, largest block 196 states, 4 spectator configurations: H2a H2b H3 iPrH iMeA iMeB H4a H4b", o);
        Assert.Contains("largest cut |J/dnu| = 0.0067 (OCH2-OCH2CH3", o);
    }

    [Fact]
    public void ExactAndThresholdTogetherAreAUserError()
    {
        var (code, _, err) = CliTests.Run("check", CliTests.Example(Large), "--exact", "--split-threshold", "0.1");
        Assert.Equal(1, code);
        Assert.Contains("exclude each other", err);
    }

    [Fact]
    public void LargestBlockMatchesWhatTheEngineDiagonalises()
    {
        // The report and the engine use the same plan (SpectrumEngine.PlanFor with the default options).
        var system = SpinSystemFiles.Read(CliTests.Example(Large)).System;
        var lines = SpinSim.Core.Engine.SpectrumEngine.Compute(system);
        var (_, o, _) = CliTests.Run("check", CliTests.Example(Large));
        Assert.Contains($"largest block    {lines.LargestBlock} states", o);
    }
}
