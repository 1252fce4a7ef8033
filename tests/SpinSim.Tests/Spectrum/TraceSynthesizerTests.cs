using MathNet.Numerics;
using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Spectrum;

public class TraceSynthesizerTests
{
    private const double ObserveMHz = 400;

    public static TheoryData<LineshapeKind, int, int, double> RandomSets => new()
    {
        { LineshapeKind.Lorentzian, 1, 1, 0 },
        { LineshapeKind.Gaussian, 1, 2, 0 },
        { LineshapeKind.Voigt, 1, 3, 0 },
        { LineshapeKind.Lorentzian, 40, 4, 0 },
        { LineshapeKind.Gaussian, 40, 5, 0 },
        { LineshapeKind.Voigt, 40, 6, 0 },
        { LineshapeKind.Lorentzian, 3_000, 7, 0 },
        { LineshapeKind.Gaussian, 3_000, 8, 0 },
        { LineshapeKind.Voigt, 3_000, 9, 0 },
        { LineshapeKind.Lorentzian, 100_000, 10, 0 },
        { LineshapeKind.Gaussian, 100_000, 11, 0 },
        { LineshapeKind.Voigt, 100_000, 12, 0 },
        { LineshapeKind.Lorentzian, 500, 13, 30 },
        { LineshapeKind.Gaussian, 500, 14, -75 },
        { LineshapeKind.Voigt, 500, 15, 120 },
        // Enough lines for the transforms (500 x 4,096 evaluations are drawn directly, line by line).
        { LineshapeKind.Lorentzian, 3_000, 16, 30 },
        { LineshapeKind.Gaussian, 3_000, 17, -75 },
        { LineshapeKind.Voigt, 3_000, 18, 120 },
    };

    [Theory]
    [MemberData(nameof(RandomSets))]
    public void RandomLineSets_MatchTheDirectSumOfWholeProfiles(LineshapeKind kind, int count, int seed, double phaseDeg)
    {
        // Reference: the direct sum, at every point, of every line's untruncated profile (LineProfile; a Voigt's absorption
        // from the tabulated kernel, held to the Faddeeva function within 1e-13 of its peak by VoigtKernelTests). Widths
        // 0.2 to 5 grid steps, each line its own; centres over the grid and up to a tenth of it beyond either end; both
        // axis directions. Property: every point within 1e-9 of the tallest point (issue 14).
        var random = new Random(seed);
        var points = count > 10_000 ? 512 : 4_096;
        var grid = seed % 2 == 0 ? new SpectrumGrid(8, 7, points, ObserveMHz) : new SpectrumGrid(7, 8, points, ObserveMHz);
        var step = Math.Abs(grid.StepHz);
        var (lowHz, highHz) = (7 * ObserveMHz, 8 * ObserveMHz);
        var lines = Enumerable.Range(0, count).Select(_ => new RenderLine(
            lowHz - 0.1 * (highHz - lowHz) + 1.2 * (highHz - lowHz) * random.NextDouble(),
            0.1 + 1.9 * random.NextDouble(),
            (0.2 + 4.8 * random.NextDouble()) * step)).ToArray();
        AssertMatchesTheDirectSum(lines, grid, kind, phaseDeg, $"{kind}, {count} lines");
    }

    [Theory]
    [InlineData(LineshapeKind.Lorentzian, 0.0, 60)]
    [InlineData(LineshapeKind.Gaussian, 0.0, 60)]
    [InlineData(LineshapeKind.Voigt, 0.0, 60)]
    [InlineData(LineshapeKind.Lorentzian, 40.0, 60)]
    [InlineData(LineshapeKind.Voigt, -40.0, 60)]
    [InlineData(LineshapeKind.Lorentzian, 0.0, 18)]
    [InlineData(LineshapeKind.Gaussian, 0.0, 18)]
    [InlineData(LineshapeKind.Voigt, 0.0, 18)]
    [InlineData(LineshapeKind.Lorentzian, 40.0, 18)]
    public void ManyLinesOfOneWidth_MatchTheDirectSum(LineshapeKind kind, double phaseDeg, int widthSteps)
    {
        // The smooth route (Lagrange deposit of one width): 5,000 lines of one width. 60 steps wide, on the grid itself;
        // 18 steps, too narrow for that: the Voigt goes by the smooth route on a grid twice as fine, the other shapes by
        // their usual routes. Reference and property as above.
        var random = new Random(21);
        var grid = new SpectrumGrid(9, 6, 4_096, ObserveMHz);
        var width = widthSteps * Math.Abs(grid.StepHz);
        var lines = Enumerable.Range(0, 5_000).Select(_ => new RenderLine((6.2 + 2.6 * random.NextDouble()) * ObserveMHz, 0.1 + random.NextDouble(), width)).ToArray();
        AssertMatchesTheDirectSum(lines, grid, kind, phaseDeg, $"{kind}, {widthSteps} steps");
    }

    [Theory]
    [InlineData(LineshapeKind.Lorentzian, 20.0)]
    [InlineData(LineshapeKind.Gaussian, 20.0)]
    [InlineData(LineshapeKind.Voigt, 20.0)]
    public void Area_IsTheSummedAreasLessTheClosedFormTailsBeyondTheGrid(LineshapeKind kind, double widthSteps)
    {
        // Source: closed forms of the area of a profile between a and b: Lorentzian (1/pi)[atan(2(b - c)/G) - atan(2(a - c)/G)],
        // Gaussian (1/2)[erf((b - c)/(sigma sqrt 2)) - erf((a - c)/(sigma sqrt 2))]; a Voigt's tail beyond b is the
        // Gaussian average of the Lorentzian tails, integrated by Math.NET's Gauss-Kronrod rule. The grid's sum times its step
        // is the midpoint rule over [first - step/2, last + step/2], exact here to far below 1e-12 (Poisson summation: the
        // lines are 20 steps wide, the edges 30,000 steps away). Lines lie in the middle 1 % of 65,536 points.
        var random = new Random(31);
        var grid = new SpectrumGrid(10, 0, 65_536, ObserveMHz);
        var step = Math.Abs(grid.StepHz);
        var lines = Enumerable.Range(0, 200).Select(_ => new RenderLine((4.95 + 0.1 * random.NextDouble()) * ObserveMHz, 0.1 + random.NextDouble(), widthSteps * step)).ToArray();
        var shape = Lineshape.FromKind(kind);
        var trace = TraceSynthesizer.Render(lines, grid, shape);
        double low = -0.5 * step, high = 10 * ObserveMHz + 0.5 * step;
        double expected = 0, expectedMoment = 0;
        foreach (var l in lines)
        {
            var profile = shape.Profile(l.FwhmHz);
            double inside = 1 - Tail(profile, high - l.CentreHz) - Tail(profile, l.CentreHz - low);
            expected += l.Area * inside;
            expectedMoment += l.Area * (l.CentreHz * inside + FirstMomentAboutCentre(profile, low - l.CentreHz, high - l.CentreHz));
        }
        var area = trace.Sum() * step;
        var moment = Enumerable.Range(0, grid.Points).Sum(i => grid.HzAt(i) * trace[i]) * step;
        Assert.True(Math.Abs(area - expected) <= 1e-12 * lines.Sum(l => l.Area), $"area {area:R}, expected {expected:R}");
        // First moment (intensity-weighted mean frequency): exact invariant of the profiles, within the axis's rounding.
        Assert.True(Math.Abs(moment / area - expectedMoment / expected) <= 1e-8, $"mean {moment / area:R} Hz, expected {expectedMoment / expected:R}");
    }

    [Theory]
    [InlineData(LineshapeKind.Lorentzian)]
    [InlineData(LineshapeKind.Voigt)]
    public void A_grid_of_a_few_points_matches_the_direct_sum(LineshapeKind kind)
    {
        // The shortest transforms, at the small end of the synthesiser's scratch arrays; same property as above, lines 0.5
        // to 3 steps wide over the grid and a little beyond.
        var random = new Random(41);
        var grid = new SpectrumGrid(7.02, 7.0, 4, ObserveMHz);
        var step = Math.Abs(grid.StepHz);
        var lines = Enumerable.Range(0, 200).Select(_ => new RenderLine((6.995 + 0.03 * random.NextDouble()) * ObserveMHz,
            0.1 + random.NextDouble(), (0.5 + 2.5 * random.NextDouble()) * step)).ToArray();
        AssertMatchesTheDirectSum(lines, grid, kind, 0, $"{kind}, 4 points");
    }

    [Fact]
    public void Render_IsRepeatable()
    {
        var lines = RandomLines(20_000, seed: 5);
        var grid = SpectrumGrid.Covering(lines, 32_768, ObserveMHz);
        Assert.Equal(TraceSynthesizer.Render(lines, grid, LineshapeKind.Lorentzian), TraceSynthesizer.Render(lines, grid, LineshapeKind.Lorentzian));
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
    public void LinesOutsideTheGrid_ContributeTheirWholeTails()
    {
        // Closed form: a Lorentzian of FWHM G at distance d contributes (1/pi)(G/2) / (d^2 + (G/2)^2) per Hz. One line is
        // 7 kHz beyond a 4 kHz grid (evaluated directly), one just past its edge (on the FFT's span).
        var grid = new SpectrumGrid(10, 0, 1_000, ObserveMHz);
        RenderLine[] lines = [new RenderLine(-3000, 1, 1), new RenderLine(4010, 2, 3)];
        var trace = TraceSynthesizer.Render(lines, grid, LineshapeKind.Lorentzian);
        for (var i = 0; i < grid.Points; i++)
        {
            var expected = lines.Sum(l => l.Area * 0.5 * l.FwhmHz / Math.PI / (Math.Pow(grid.HzAt(i) - l.CentreHz, 2) + 0.25 * l.FwhmHz * l.FwhmHz));
            Assert.Equal(expected, trace[i], 1e-9 * expected + 1e-18);
        }
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
    public void Render_RejectsNonFiniteCentresAndAreas()
    {
        var grid = new SpectrumGrid(10, 0, 100, ObserveMHz);
        Assert.Throws<ArgumentException>(() => TraceSynthesizer.Render([new RenderLine(double.NaN, 1, 1)], grid, LineshapeKind.Gaussian));
        Assert.Throws<ArgumentException>(() => TraceSynthesizer.Render([new RenderLine(100, double.PositiveInfinity, 1)], grid, LineshapeKind.Gaussian));
    }

    /// <summary>Lines between 0.5 and 9.5 ppm, 0.5 to 3 Hz wide, areas 0.5 to 2.</summary>
    internal static RenderLine[] RandomLines(int count, int seed)
    {
        var random = new Random(seed);
        return Enumerable.Range(0, count)
            .Select(_ => new RenderLine((0.5 + 9 * random.NextDouble()) * ObserveMHz, 0.5 + 1.5 * random.NextDouble(), 0.5 + 2.5 * random.NextDouble()))
            .ToArray();
    }

    /// <summary>Every line at every point, untruncated.</summary>
    private static double[] Direct(RenderLine[] lines, SpectrumGrid grid, Lineshape shape, PhaseRotation phase)
    {
        var trace = new double[grid.Points];
        var profiles = lines.Select(l => shape.Profile(l.FwhmHz, tabulated: true)).ToArray();
        Parallel.For(0, trace.Length, i =>
        {
            double hz = grid.HzAt(i), sum = 0;
            for (var l = 0; l < lines.Length; l++) sum += lines[l].Area * profiles[l].Phased(hz - lines[l].CentreHz, phase);
            trace[i] = sum;
        });
        return trace;
    }

    /// <summary>The area of a unit profile beyond <paramref name="distanceHz"/> from its centre, on one side.</summary>
    /// <summary>Issue 14's property: the synthesised trace within 1e-9 of the tallest point of the direct sum of whole profiles.</summary>
    [Theory]
    [InlineData(LineshapeKind.Gaussian)]
    [InlineData(LineshapeKind.Voigt)]
    public void Lines_far_outside_the_grid_keep_their_dispersion_tails_under_a_phase_error(LineshapeKind kind)
    {
        // Lines one and a half to three grid widths beyond either end are drawn directly at every point. Their absorption
        // is negligible there, but with a phase error the dispersion falls only as 1/x and reaches the grid (a Gaussian's
        // window of 8.3 sigma, right for absorption, once cut it off). Reference and property as above, with the lines
        // inside the grid kept small so that the tails matter.
        var grid = new SpectrumGrid(8, 7, 4_096, ObserveMHz);
        var span = 1 * ObserveMHz;
        var step = Math.Abs(grid.StepHz);
        var lines = new[]
        {
            new RenderLine(8 * ObserveMHz + 1.5 * span, 1.0, 6 * step),
            new RenderLine(7 * ObserveMHz - 3.0 * span, 0.7, 4 * step),
            new RenderLine(7.5 * ObserveMHz, 1e-3, 3 * step),
        };
        AssertMatchesTheDirectSum(lines, grid, kind, 60, $"{kind}, far outside, phased");
    }

    private static void AssertMatchesTheDirectSum(RenderLine[] lines, SpectrumGrid grid, LineshapeKind kind, double phaseDeg, string label)
    {
        var shape = Lineshape.FromKind(kind);
        var phase = PhaseRotation.FromDegrees(phaseDeg);
        var fast = TraceSynthesizer.Render(lines, grid, shape, phase);
        var direct = Direct(lines, grid, shape, phase);
        var tallest = direct.Max(Math.Abs);
        var worst = fast.Zip(direct).Max(p => Math.Abs(p.First - p.Second));
        Assert.True(worst <= 1e-9 * tallest, $"{label}: largest difference {worst / tallest:E2} of the tallest point");
    }

    private static double Tail(LineProfile profile, double distanceHz)
    {
        if (profile.IsGaussian) return 0.5 * SpecialFunctions.Erfc(distanceHz / (profile.SigmaHz * Math.Sqrt(2)));
        var half = profile.LorentzianFwhmHz / 2;
        double LorentzianTail(double d) => Math.Atan2(half, d) / Math.PI;
        if (profile.SigmaHz == 0) return LorentzianTail(distanceHz);
        var sigma = profile.SigmaHz;
        return Integrate.GaussKronrod(s => Math.Exp(-0.5 * s * s / (sigma * sigma)) / (sigma * Math.Sqrt(2 * Math.PI)) * LorentzianTail(distanceHz - s),
            -12 * sigma, 12 * sigma, 1e-13, 12, 61);
    }

    /// <summary>The first moment about the centre of a unit profile over [a, b] (offsets in Hz): zero for a symmetric Gaussian window, closed form for a Lorentzian.</summary>
    private static double FirstMomentAboutCentre(LineProfile profile, double a, double b)
    {
        if (profile.IsGaussian) return 0; // the tails beyond 30,000 steps are below 1e-300
        var half = profile.LorentzianFwhmHz / 2;
        double Lorentzian(double lo, double hi) => half / (2 * Math.PI) * Math.Log((hi * hi + half * half) / (lo * lo + half * half));
        if (profile.SigmaHz == 0) return Lorentzian(a, b);
        var sigma = profile.SigmaHz;
        return Integrate.GaussKronrod(s => Math.Exp(-0.5 * s * s / (sigma * sigma)) / (sigma * Math.Sqrt(2 * Math.PI)) * (Lorentzian(a - s, b - s) + s * (Math.Atan2(b - s, half) - Math.Atan2(a - s, half)) / Math.PI),
            -12 * sigma, 12 * sigma, 1e-13, 12, 61);
    }

    private static void AssertRelative(double expected, double actual, double tolerance) =>
        Assert.True(Math.Abs(actual - expected) <= tolerance * Math.Abs(expected),
            $"expected {expected:R}, got {actual:R} (relative {Math.Abs(actual - expected) / Math.Abs(expected):E2}, allowed {tolerance:E1})");

    /// <summary>
    /// The widths shared by enough lines to be drawn by the smooth route are found exactly among any number of distinct
    /// widths (checked against a plain count of every width): 1,024 lines of one width are found, 1,023 are not.
    /// </summary>
    [Theory]
    [InlineData(1, false)]
    [InlineData(2, false)]
    [InlineData(3, true)]   // in runs of one width, as the lines of one nucleus come
    public void Widths_shared_by_enough_lines_are_found_among_many_distinct_ones(int seed, bool inRuns)
    {
        var random = new Random(seed);
        var widths = Enumerable.Range(0, 60_000).Select(_ => 0.5 + random.NextDouble())
            .Concat(Enumerable.Repeat(1.0, 1024)).Concat(Enumerable.Repeat(2.0, 1023)).Concat(Enumerable.Repeat(3.0, 5000))
            .OrderBy(w => inRuns ? w : random.Next()).ToArray();
        var lines = widths.Select((w, i) => new RenderLine(i, 1, w)).ToArray();

        var found = TraceSynthesizer.FrequentWidths(lines, 1024);

        var expected = widths.GroupBy(w => w).Where(g => g.Count() >= 1024).ToDictionary(g => g.Key, g => g.Count());
        Assert.Equal(expected.OrderBy(e => e.Key), found.OrderBy(e => e.Key));
        Assert.Equal(1024, found[1.0]);
        Assert.False(found.ContainsKey(2.0));
    }
}
