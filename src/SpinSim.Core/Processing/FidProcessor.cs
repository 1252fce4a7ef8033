using System.Numerics;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Core.Traces;

namespace SpinSim.Core.Processing;

/// <summary>
/// Turns a free induction decay into a spectrum trace: filter delay removed, window, zero filling, Fourier transform
/// (MathNet.Numerics), phase (given or found by minimum entropy), optional polynomial baseline, and the ppm axis from the
/// observe frequency and the file's shift reference. The trace's origin carries the <see cref="ProcessingRecord"/> of
/// every step and value. No I/O.
/// </summary>
public static class FidProcessor
{
    /// <summary>The automatic phase is found on the first this many points of the FID, zero filled to twice as many (the phase does not depend on the size).</summary>
    public const int PhasingPoints = 8192;


    /// <exception cref="ArgumentException">The options are not usable (see <see cref="ProcessingOptions.Problems"/>).</exception>
    public static SpectrumTrace Process(FreeInductionDecay fid, ProcessingOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(fid);
        var o = options ?? new ProcessingOptions();
        var problems = o.Problems();
        if (problems.Count > 0) throw new ArgumentException(string.Join("; ", problems), nameof(options));
        var n = fid.Count;
        var size = o.Points ?? ProcessingOptions.DefaultPoints(n);
        if (size < n)
            throw new ArgumentException($"the number of points ({size}) is below the {n} acquired points; give at least {NextPowerOfTwo(n)}", nameof(options));
        var steps = new List<ProcessingStep>();
        var sw = fid.SpectralWidthHz;

        // 1. Filter delay, removed as a band-limited shift of the acquired points (the build-up before time zero wraps to
        // their end). When it was found from the data, the first-order phase found by the automatic phasing is what is
        // left of it: it is folded into the delay and the phase found again, so that the shift is exact before zero filling.
        var (delay, delayHow) = o.FilterDelayPoints is { } given ? (given, "given")
            : fid.StatedFilterDelayPoints is { } stated ? (stated, "stated in the file")
            : (FilterDelay.FromData(fid.Points), "found from the data (the FID's first maximum, refined by the first-order phase)");
        if (delay >= n / 2.0) throw new ArgumentException($"a filter delay of {delay} points leaves too little of the {n}-point FID", nameof(options));
        var window = Window(o, n, fid.DwellSeconds);
        var spectrum = Transform(Aligned(fid.Points, delay), delay, window, size);

        double p0, p1;
        string phaseHow;
        if (o.AutomaticPhase)
        {
            (p0, p1) = FindPhase(fid.Points, delay, window, size, spectrum);
            if (fid.StatedFilterDelayPoints is null && o.FilterDelayPoints is null && Math.Abs(p1) > 0.5)
            {
                delay = Math.Max(0, delay + p1 / 360);
                spectrum = Transform(Aligned(fid.Points, delay), delay, window, size);
                (p0, p1) = FindPhase(fid.Points, delay, window, size, spectrum, (p0, 0));
            }
            phaseHow = "automatic, minimum entropy (Chen et al., J. Magn. Reson. 158, 164, 2002)";
        }
        else
        {
            (p0, p1) = (o.ZeroOrderPhaseDeg ?? 0, o.FirstOrderPhaseDeg ?? 0);
            phaseHow = "given";
        }
        steps.Add(new ProcessingStep("filter_delay", delayHow, [new("points", delay, "points")]));
        steps.Add(o.Window == WindowShape.None
            ? new ProcessingStep("window", "none", [])
            : new ProcessingStep("window", o.Window == WindowShape.Exponential ? "exponential" : "Gaussian", [new("width_hz", o.WindowHz, "Hz")]));
        steps.Add(new ProcessingStep("zero_fill", $"{n} acquired complex points to {size}", [new("acquired_points", n, "points"), new("points", size, "points")]));
        steps.Add(new ProcessingStep("fourier_transform", $"complex FFT, {Fft.Name}", [new("spectral_width_hz", sw, "Hz")]));

        var real = new double[size];
        MinimumEntropyPhasing.Apply(spectrum, p0, p1, real);

        var carrierPpm = fid.HighEdgePpm is { } edge ? edge - sw / 2 / fid.ObserveMHz : 0;
        steps.Add(new ProcessingStep("phase", phaseHow,
            [new("zero_order_deg", p0, "deg"), new("first_order_deg", p1, "deg"), new("pivot_ppm", carrierPpm, "ppm")]));

        // 5. Baseline.
        if (o.BaselineOrder is { } order)
        {
            var baseline = PolynomialBaseline.Fit(real, order);
            for (var k = 0; k < size; k++) real[k] -= baseline[k];
            steps.Add(new ProcessingStep("baseline", "polynomial under the spectrum, points above it clipped and refitted (Lieber and Mahadevan-Jansen 2003)",
                [new("order", order, "")]));
        }

        // 6. Axis, high ppm first as drawn: bin k (ascending) is at (k - size/2) SW / size Hz from the carrier.
        var ppm = new double[size];
        var y = new double[size];
        for (var k = 0; k < size; k++)
        {
            var j = size - 1 - k;
            ppm[k] = carrierPpm + (j - size / 2) * (sw / size) / fid.ObserveMHz;
            y[k] = real[j];
        }
        steps.Add(fid.HighEdgePpm is { } e2
            ? new ProcessingStep("axis", "ppm from the observe frequency and the file's shift reference",
                [new("observe_mhz", fid.ObserveMHz, "MHz"), new("high_edge_ppm", e2, "ppm")])
            : new ProcessingStep("axis", "no shift reference in the file: the window's centre was put at 0 ppm; set a known line to its shift",
                [new("observe_mhz", fid.ObserveMHz, "MHz")]));

        var record = new ProcessingRecord(ProcessingRecord.FidKind, steps);
        var origin = fid.Origin with { Processing = record };
        return new SpectrumTrace(ppm, y, fid.ObserveMHz, fid.Nucleus, origin);
    }

    /// <summary>The next power of two at or above <paramref name="n"/>.</summary>
    public static int NextPowerOfTwo(int n)
    {
        var p = 1;
        while (p < n) p <<= 1;
        return p;
    }

    private static double[] Window(ProcessingOptions o, int n, double dwell)
    {
        var w = new double[n];
        for (var k = 0; k < n; k++)
        {
            var t = k * dwell;
            w[k] = o.Window switch
            {
                WindowShape.Exponential => Math.Exp(-Math.PI * o.WindowHz * t),
                WindowShape.Gaussian => Math.Exp(-Math.Pow(Math.PI * o.WindowHz * t, 2) / (4 * Math.Log(2))),
                _ => 1,
            };
        }
        return w;
    }

    /// <summary>
    /// The acquired points moved earlier by <paramref name="delay"/> points as a band-limited (circular) shift: the
    /// spectrum of the n points times exp(2 pi i m delay / n), m the signed frequency index. Time zero lands on point 0.
    /// </summary>
    private static Complex[] Aligned(Complex[] fid, double delay)
    {
        var n = fid.Length;
        var data = (Complex[])fid.Clone();
        if (delay == 0) return data;
        Fft.Forward(data);
        for (var m = 0; m < n; m++)
        {
            var signed = m < (n + 1) / 2 ? m : m - n;
            // 1/n here: the inverse transform is unscaled.
            data[m] *= Complex.FromPolarCoordinates(1.0 / n, 2 * Math.PI * signed * delay / n);
        }
        Fft.Inverse(data);
        return data;
    }

    /// <summary>
    /// The spectrum in ascending frequency (the carrier at index size/2) of the aligned points: the signal from time zero
    /// weighted by the window, the first point halved when
    /// the signal steps up at time zero (the point before it, wrapped to the end, below a tenth of it): it then counts half
    /// in the discrete transform of a one-sided signal (common practice for quadrature data); a digital filter's build-up
    /// already spreads the step over the points before time zero, so there it keeps its weight. Zero filled to <paramref name="size"/>, with the wrapped
    /// build-up (the last ceil(delay) points) moved to the buffer's end, where a circular transform puts negative times.
    /// Only the first <paramref name="size"/> minus the build-up points are used when the buffer is shorter than the FID.
    /// </summary>
    private static Complex[] Transform(Complex[] aligned, double delay, double[] window, int size)
    {
        var n = aligned.Length;
        var wrap = Math.Min((int)Math.Ceiling(delay), n / 2);
        var data = new Complex[size];
        var signal = Math.Min(n - wrap, size - wrap);
        for (var k = 0; k < signal; k++) data[k] = aligned[k] * window[k];
        if (aligned[n - 1].Magnitude < 0.1 * aligned[0].Magnitude) data[0] /= 2;
        for (var k = 0; k < wrap; k++) data[size - wrap + k] = aligned[n - wrap + k];
        Fft.Forward(data);
        var spectrum = new Complex[size];
        var half = size / 2;
        for (var k = 0; k < size; k++) spectrum[k] = data[(k + half) % size];
        return spectrum;
    }

    /// <summary>The automatic phase, found on a spectrum of at most twice <see cref="PhasingPoints"/> points.</summary>
    private static (double ZeroOrderDeg, double FirstOrderDeg) FindPhase(Complex[] fid, double delay, double[] window, int size, Complex[] spectrum,
        (double ZeroOrderDeg, double FirstOrderDeg)? start = null)
    {
        // Zero filled once at least: on the bare acquired points a line spans too few points for a symmetric derivative.
        var phasingSize = Math.Min(size, 2 * NextPowerOfTwo(Math.Min(fid.Length, PhasingPoints)));
        var phasing = size <= phasingSize ? spectrum : Transform(Aligned(fid, delay), delay, window, phasingSize);
        return MinimumEntropyPhasing.Find(phasing, start);
    }
}
