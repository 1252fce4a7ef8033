using System.Numerics;
using MathNet.Numerics.IntegralTransforms;
using SpinSim.Core.Processing;
using SpinSim.Core.Traces;

namespace SpinSim.Tests.Processing;

/// <summary>
/// Synthetic-recovery checks: an FID made from known lines (invented values) with a zero-order phase error and a
/// digital-filter delay must come back as absorption lines at the right ppm with the right relative areas.
/// </summary>
public class SyntheticFidTests
{
    private const double ObserveMHz = 400.0, SpectralWidthHz = 4000.0, HighEdgePpm = 10.0, WidthHz = 1.0;
    private const int Points = 16384;

    // Invented lines: shift in ppm and relative area.
    private static readonly (double Ppm, double Area)[] Lines = [(7.26, 1.0), (3.71, 2.0), (2.05, 3.0), (1.22, 6.0)];

    /// <summary>
    /// Sum of decaying complex exponentials (a Lorentzian line of FWHM W decays as exp(-pi W t); Fourier pair, exact),
    /// with the phase error applied to every line, then delayed by <paramref name="delayPoints"/> through an ideal
    /// band-limited filter: the spectrum times exp(-2 pi i f d dwell), computed with MathNet's FFT.
    /// </summary>
    public static FreeInductionDecay Make(double phaseDeg, double delayPoints, double noise = 0, int seed = 1)
    {
        var dwell = 1 / SpectralWidthHz;
        var carrierPpm = HighEdgePpm - SpectralWidthHz / 2 / ObserveMHz;
        var s = new Complex[Points];
        var phase = Complex.FromPolarCoordinates(1, phaseDeg * Math.PI / 180);
        for (var k = 0; k < Points; k++)
        {
            var t = k * dwell;
            foreach (var (ppm, area) in Lines)
            {
                var f = (ppm - carrierPpm) * ObserveMHz;
                s[k] += area * phase * Complex.FromPolarCoordinates(Math.Exp(-Math.PI * WidthHz * t), 2 * Math.PI * f * t);
            }
        }
        if (delayPoints != 0)
        {
            Fourier.Forward(s, FourierOptions.Matlab);
            for (var m = 0; m < Points; m++)
            {
                var signed = m < Points / 2 ? m : m - Points;
                s[m] *= Complex.FromPolarCoordinates(1, -2 * Math.PI * signed * delayPoints / Points);
            }
            Fourier.Inverse(s, FourierOptions.Matlab);
        }
        if (noise > 0)
        {
            var random = new Random(seed);
            for (var k = 0; k < Points; k++) s[k] += new Complex(noise * Gauss(random), noise * Gauss(random));
        }
        return new FreeInductionDecay(s, dwell, ObserveMHz, "1H", HighEdgePpm, null, TraceOrigin.Describe("synthetic FID (invented lines)"));
    }

    private static double Gauss(Random r) => Math.Sqrt(-2 * Math.Log(1 - r.NextDouble())) * Math.Cos(2 * Math.PI * r.NextDouble());

    [Theory]
    [InlineData(0.0, 0.0)]
    [InlineData(45.0, 3.0)]
    [InlineData(90.0, 10.0)]
    [InlineData(-90.0, 7.4)]
    [InlineData(90.0, 9.6)]
    public void Known_lines_come_back_phased_at_their_ppm_with_their_areas(double phaseErrorDeg, double delayPoints)
    {
        var trace = FidProcessor.Process(Make(phaseErrorDeg, delayPoints));

        var record = trace.Origin.Processing!;
        var p0 = record.Step("phase")!.Value("zero_order_deg")!.Value;
        var p1 = record.Step("phase")!.Value("first_order_deg")!.Value;
        var delay = record.Step("filter_delay")!.Value("points")!.Value;
        // The correction undoes the error: p0 = -error at the window's centre (mod 360). A delay of d points is a phase of
        // -360 d f / SW, so the total delay removed is the delay step plus p1 / 360 (exact relations of the DFT). The
        // entropy minimum of sampled lines sits about a degree from the true phase, and zero filling breaks the circular
        // symmetry of a fractional band-limited delay, so a few degrees and a tenth of a point are allowed.
        Assert.InRange(Math.Abs(Math.IEEERemainder(p0 + phaseErrorDeg, 360)), 0, 5.0);
        Assert.InRange(delay + p1 / 360, delayPoints - 0.1, delayPoints + 0.1);

        var tallest = trace.Intensity.Max();
        Assert.True(trace.Intensity.Min() > -0.005 * tallest, $"most negative point {trace.Intensity.Min() / tallest:P2} of the tallest");

        var areas = new List<double>();
        foreach (var (ppm, _) in Lines)
        {
            var found = Referencing.FindLine(trace, ppm);
            Assert.InRange(found, ppm - 0.0005, ppm + 0.0005);
            areas.Add(Integral(trace, ppm, 25 / ObserveMHz));
        }
        // Equal widths: the same fraction of each Lorentzian falls inside +-25 Hz, so area ratios are exact up to the
        // neighbours' far tails (below 1e-4 here).
        for (var i = 1; i < Lines.Length; i++)
        {
            var expected = Lines[i].Area / Lines[0].Area;
            Assert.InRange(areas[i] / areas[0], expected * 0.995, expected * 1.005);
        }
    }

    [Fact]
    public void Given_phase_and_delay_are_used_as_given()
    {
        var trace = FidProcessor.Process(Make(30, 0), new ProcessingOptions { ZeroOrderPhaseDeg = -30, FirstOrderPhaseDeg = 0, FilterDelayPoints = 0 });

        var phase = trace.Origin.Processing!.Step("phase")!;
        Assert.Equal("given", phase.How);
        Assert.Equal(-30, phase.Value("zero_order_deg"));
        Assert.True(trace.Intensity.Min() > -0.005 * trace.Intensity.Max());
    }

    [Fact]
    public void Exponential_window_adds_its_width()
    {
        // exp(-pi W t) multiplies the FID's exp(-pi W0 t): the Lorentzian FWHM becomes W0 + W (Fourier pair, exact).
        var sharp = FidProcessor.Process(Make(0, 0), new ProcessingOptions { Window = WindowShape.None, Points = 262144 });
        var broad = FidProcessor.Process(Make(0, 0), new ProcessingOptions { Window = WindowShape.Exponential, WindowHz = 2, Points = 262144 });

        Assert.InRange(HalfWidthHz(sharp, 1.22), WidthHz - 0.02, WidthHz + 0.02);
        Assert.InRange(HalfWidthHz(broad, 1.22), WidthHz + 2 - 0.02, WidthHz + 2 + 0.02);
    }

    [Fact]
    public void Noisy_fid_still_phases()
    {
        // Noise of 1 % of the first point of the weakest line per point.
        var trace = FidProcessor.Process(Make(60, 5, noise: 0.01));
        var p0 = trace.Origin.Processing!.Step("phase")!.Value("zero_order_deg")!.Value;
        Assert.InRange(Math.Abs(Math.IEEERemainder(p0 + 60, 360)), 0, 5.0);
    }

    private static double Integral(SpectrumTrace t, double centrePpm, double halfPpm)
    {
        double sum = 0;
        for (var i = 0; i < t.Count; i++)
            if (Math.Abs(t.ShiftPpm[i] - centrePpm) <= halfPpm) sum += t.Intensity[i];
        return sum;
    }

    private static double HalfWidthHz(SpectrumTrace t, double ppm)
    {
        var top = Enumerable.Range(0, t.Count).Where(i => Math.Abs(t.ShiftPpm[i] - ppm) < 0.02).MaxBy(i => t.Intensity[i]);
        var half = t.Intensity[top] / 2;
        double Cross(int step)
        {
            var i = top;
            while (t.Intensity[i + step] > half) i += step;
            var f = (t.Intensity[i] - half) / (t.Intensity[i] - t.Intensity[i + step]);
            return t.ShiftPpm[i] + f * (t.ShiftPpm[i + step] - t.ShiftPpm[i]);
        }
        return Math.Abs(Cross(1) - Cross(-1)) * ObserveMHz;
    }
}
