using MathNet.Numerics;
using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Spectrum;

public class TraceSynthesizerTests
{
    private const double ObserveMHz = 400;

    [Fact]
    public void GaussianTrace_IntegratesToSummedAreas()
    {
        // Source: unit area of each profile (science notes, Lineshapes); trapezoid rule over Hz.
        var lines = RandomLines(60, seed: 1);
        var grid = SpectrumGrid.Covering(lines, 65_536, ObserveMHz);
        var trace = TraceSynthesizer.Render(lines, grid, LineshapeKind.Gaussian);
        AssertRelative(lines.Sum(l => l.Area), Trapezoid(trace, grid), 1e-3);
    }

    [Fact]
    public void LorentzianTrace_IntegratesToSummedAreas_LessTheStatedTails()
    {
        // Source: Lorentzian area between a and b, (1/pi)[atan(2(b - c)/G) - atan(2(a - c)/G)] (closed form);
        // the window is the cut-off +-K FWHM intersected with the grid; trapezoid rule over Hz.
        var lines = RandomLines(60, seed: 2);
        var grid = SpectrumGrid.Covering(lines, 65_536, ObserveMHz);
        const double cutoff = TraceSynthesizer.DefaultCutoffFwhm;
        var trace = TraceSynthesizer.Render(lines, grid, LineshapeKind.Lorentzian, cutoff);
        double lowHz = Math.Min(grid.HzAt(0), grid.HzAt(grid.Points - 1)), highHz = Math.Max(grid.HzAt(0), grid.HzAt(grid.Points - 1));
        double expected = lines.Sum(l =>
        {
            double a = Math.Max(lowHz, l.CentreHz - cutoff * l.FwhmHz), b = Math.Min(highHz, l.CentreHz + cutoff * l.FwhmHz);
            return l.Area / Math.PI * (Math.Atan(2 * (b - l.CentreHz) / l.FwhmHz) - Math.Atan(2 * (a - l.CentreHz) / l.FwhmHz));
        });
        AssertRelative(expected, Trapezoid(trace, grid), 1e-3);
    }

    [Fact]
    public void LorentzianTrace_WithWholeTailsOnGrid_LosesExactlyTheStatedFraction()
    {
        // Source: Lorentzian tail beyond +-K FWHM, 1 - (2/pi) atan(2K) (closed form). A grid wider than the
        // windows leaves the cut-off as the only loss.
        const double cutoff = 20, fwhmHz = 1.0;
        var lines = new[] { new RenderLine(1000, 2.0, fwhmHz), new RenderLine(1010, 0.5, fwhmHz) };
        var grid = new SpectrumGrid(4, 1, 60_001, ObserveMHz); // 0.02 Hz steps from 1600 to 400 Hz
        var trace = TraceSynthesizer.Render(lines, grid, LineshapeKind.Lorentzian, cutoff);
        double expected = 2.5 * (1 - TraceSynthesizer.LorentzianTailFraction(cutoff));
        // The trapezoid rule meets a step at each window edge: an error of about (step / 2) x the profile
        // there, 1e-5 of the area, far below the 1.6 % tail being checked.
        AssertRelative(expected, Trapezoid(trace, grid), 1e-4);
    }

    [Fact]
    public void VoigtTrace_IntegratesToSummedAreas_WithinTheWindows()
    {
        // Source: unit-area Voigt profile, integrated over each line's window by Math.NET's Gauss-Kronrod rule
        // as the reference; trapezoid rule over Hz for the trace.
        var lines = RandomLines(8, seed: 3);
        var grid = SpectrumGrid.Covering(lines, 65_536, ObserveMHz);
        var shape = Lineshape.Voigt(0.3);
        const double cutoff = TraceSynthesizer.DefaultCutoffFwhm;
        var trace = TraceSynthesizer.Render(lines, grid, shape, cutoff);
        double lowHz = Math.Min(grid.HzAt(0), grid.HzAt(grid.Points - 1)), highHz = Math.Max(grid.HzAt(0), grid.HzAt(grid.Points - 1));
        double expected = lines.Sum(l =>
        {
            double a = Math.Max(lowHz, l.CentreHz - cutoff * l.FwhmHz), b = Math.Min(highHz, l.CentreHz + cutoff * l.FwhmHz);
            return l.Area * Integrate.GaussKronrod(nu => shape.DensityPerHz(nu - l.CentreHz, l.FwhmHz), a, b, 1e-10, 30, 61);
        });
        AssertRelative(expected, Trapezoid(trace, grid), 1e-3);
    }

    [Theory]
    [InlineData(LineshapeKind.Lorentzian, 20.0)]
    [InlineData(LineshapeKind.Lorentzian, TraceSynthesizer.DefaultCutoffFwhm)]
    [InlineData(LineshapeKind.Voigt, 20.0)]
    [InlineData(LineshapeKind.Gaussian, 20.0)]
    public void CutOff_AgreesWithBruteForce_WithinTheStatedTail(LineshapeKind kind, double cutoff)
    {
        // Source: Lorentzian tail 1 - (2/pi) atan(2K) (closed form) bounds the integrated difference; the
        // profile's value at K FWHM bounds any single point. Brute force evaluates every line at every point.
        var lines = RandomLines(25, seed: 4);
        var grid = SpectrumGrid.Covering(lines, 8_192, ObserveMHz);
        var shape = Lineshape.FromKind(kind);
        var fast = TraceSynthesizer.Render(lines, grid, shape, cutoff);
        var brute = BruteForce(lines, grid, shape);

        double totalArea = lines.Sum(l => l.Area);
        double peak = brute.Max();
        // Besides the tails, the two paths round the axis differently (about 1e-12 Hz on 4 kHz), which moves
        // a line's values by about 1e-12 of its peak.
        double roundingBound = 1e-11 * peak;
        double pointBound = lines.Sum(l => l.Area * Lineshape.LorentzianDensityPerHz(cutoff * l.FwhmHz, l.FwhmHz)) + roundingBound;
        double integratedDifference = 0;
        for (int i = 0; i < fast.Length; i++)
        {
            double difference = Math.Abs(fast[i] - brute[i]);
            Assert.True(difference <= pointBound, $"point {i}: difference {difference:E2} above bound {pointBound:E2}");
            integratedDifference += difference * Math.Abs(grid.StepHz);
        }
        Assert.True(integratedDifference <= totalArea * TraceSynthesizer.LorentzianTailFraction(cutoff),
            $"integrated difference {integratedDifference:E3} above {totalArea * TraceSynthesizer.LorentzianTailFraction(cutoff):E3}");
        if (kind == LineshapeKind.Gaussian)
            Assert.True(fast.Zip(brute).Max(p => Math.Abs(p.First - p.Second)) <= roundingBound, "Gaussian cut-off is not negligible");
    }

    [Fact]
    public void ParallelRender_MatchesBruteForce_AndIsRepeatable()
    {
        // Brute force as the reference; enough lines and points that the work is split across threads.
        var lines = RandomLines(300, seed: 5);
        var grid = SpectrumGrid.Covering(lines, 32_768, ObserveMHz);
        var first = TraceSynthesizer.Render(lines, grid, LineshapeKind.Lorentzian, 1e6);
        var second = TraceSynthesizer.Render(lines, grid, LineshapeKind.Lorentzian, 1e6);
        Assert.Equal(first, second);
        var brute = BruteForce(lines, grid, Lineshape.Lorentzian);
        double peak = brute.Max();
        // The paths round the axis differently (see above): about 1e-12 of the peak.
        for (int i = 0; i < first.Length; i++)
            Assert.True(Math.Abs(first[i] - brute[i]) <= 1e-11 * peak, $"point {i}: {Math.Abs(first[i] - brute[i]) / peak:E2} of the peak");
    }

    [Fact]
    public void ReferenceOffset_ShiftsLinesAlongThePpmAxis()
    {
        // Definition (SpectrumGrid remarks): a line at delta ppm appears at delta + offset on the axis.
        var line = new RenderLine(2.0 * ObserveMHz, 1, 0.8);
        var grid = new SpectrumGrid(3, 1, 2_001, ObserveMHz, ReferenceOffsetPpm: 0.05);
        var trace = TraceSynthesizer.Render([line], grid, LineshapeKind.Gaussian);
        int top = Array.IndexOf(trace, trace.Max());
        Assert.Equal(2.05, grid.PpmAt(top), 12);
    }

    [Fact]
    public void LineOutsideTheGrid_LeavesItEmpty()
    {
        var grid = new SpectrumGrid(10, 0, 1_000, ObserveMHz);
        var trace = TraceSynthesizer.Render([new RenderLine(-3000, 1, 1)], grid, LineshapeKind.Lorentzian, 100);
        Assert.All(trace, value => Assert.Equal(0.0, value));
    }

    [Fact]
    public void LorentzianTailFraction_MatchesClosedForm()
    {
        // Closed form: fraction of a Lorentzian beyond +-K FWHM = 1 - (2/pi) atan(2K).
        foreach (double k in new[] { 1.0, 5.0, 200.0 })
            AssertRelative(1 - 2 / Math.PI * Math.Atan(2 * k), TraceSynthesizer.LorentzianTailFraction(k), 1e-12);
        AssertRelative(1.5915e-3, TraceSynthesizer.LorentzianTailFraction(200), 1e-4);
    }

    [Theory]
    [InlineData(0.0)]
    [InlineData(-1.0)]
    [InlineData(double.NaN)]
    [InlineData(double.PositiveInfinity)]
    public void Render_RejectsLinesWithoutAPositiveWidth(double fwhmHz)
    {
        var grid = new SpectrumGrid(10, 0, 100, ObserveMHz);
        var error = Assert.Throws<ArgumentException>(() => TraceSynthesizer.Render([new RenderLine(100, 1, 1), new RenderLine(200, 1, fwhmHz)], grid, LineshapeKind.Lorentzian));
        Assert.Contains("line 1", error.Message);
    }

    [Fact]
    public void Render_RejectsNonFiniteCentresAndAreas_AndTinyCutOffs()
    {
        var grid = new SpectrumGrid(10, 0, 100, ObserveMHz);
        Assert.Throws<ArgumentException>(() => TraceSynthesizer.Render([new RenderLine(double.NaN, 1, 1)], grid, LineshapeKind.Gaussian));
        Assert.Throws<ArgumentException>(() => TraceSynthesizer.Render([new RenderLine(100, double.PositiveInfinity, 1)], grid, LineshapeKind.Gaussian));
        Assert.Throws<ArgumentOutOfRangeException>(() => TraceSynthesizer.Render([new RenderLine(100, 1, 1)], grid, LineshapeKind.Gaussian, 0.5));
    }

    /// <summary>Lines between 0.5 and 9.5 ppm, 0.5 to 3 Hz wide, areas 0.5 to 2.</summary>
    internal static RenderLine[] RandomLines(int count, int seed)
    {
        var random = new Random(seed);
        return Enumerable.Range(0, count)
            .Select(_ => new RenderLine((0.5 + 9 * random.NextDouble()) * ObserveMHz, 0.5 + 1.5 * random.NextDouble(), 0.5 + 2.5 * random.NextDouble()))
            .ToArray();
    }

    private static double[] BruteForce(RenderLine[] lines, SpectrumGrid grid, Lineshape shape)
    {
        var trace = new double[grid.Points];
        for (int i = 0; i < trace.Length; i++)
        {
            double hz = grid.HzAt(i);
            foreach (var line in lines)
                trace[i] += line.Area * shape.DensityPerHz(hz - line.CentreHz, line.FwhmHz);
        }
        return trace;
    }

    private static double Trapezoid(double[] trace, SpectrumGrid grid) =>
        (trace.Sum() - 0.5 * (trace[0] + trace[^1])) * Math.Abs(grid.StepHz);

    private static void AssertRelative(double expected, double actual, double tolerance) =>
        Assert.True(Math.Abs(actual - expected) <= tolerance * Math.Abs(expected),
            $"expected {expected:R}, got {actual:R} (relative {Math.Abs(actual - expected) / Math.Abs(expected):E2}, allowed {tolerance:E1})");
}
