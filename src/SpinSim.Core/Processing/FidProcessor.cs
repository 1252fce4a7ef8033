using System.Numerics;
using MathNet.Numerics.IntegralTransforms;
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
    /// <summary>The automatic phase is found on a spectrum of at most this many points (the phase does not depend on the size).</summary>
    public const int PhasingPoints = 16384;

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

        // 1. Filter delay: the integer part by a circular shift of the acquired points (the build-up goes to the end,
        // where the signal has decayed), the fraction as a linear phase after the transform.
        var (delay, delayHow) = o.FilterDelayPoints is { } given ? (given, "given")
            : fid.StatedFilterDelayPoints is { } stated ? (stated, "stated in the file")
            : (FilterDelay.FromData(fid.Points), "found from the data (largest point of the FID)");
        if (delay >= n / 2.0) throw new ArgumentException($"a filter delay of {delay} points leaves too little of the {n}-point FID", nameof(options));
        var whole = (int)Math.Round(delay);
        var fraction = delay - whole;
        steps.Add(new ProcessingStep("filter_delay", delayHow, [new("points", delay, "points")]));

        // 2. Window on the time since time zero (the build-up before it is left unweighted).
        var weighted = new Complex[n];
        var window = Window(o, n - whole, fid.DwellSeconds, fraction);
        for (var k = 0; k < n; k++)
            weighted[k] = k < whole ? fid.Points[k] : fid.Points[k] * window[k - whole];
        // Without a filter delay the first point is time zero and counts half in the discrete transform (common practice
        // for quadrature data; the full weight adds a constant offset to the baseline).
        if (whole == 0 && fraction == 0) weighted[0] /= 2;
        steps.Add(o.Window == WindowShape.None
            ? new ProcessingStep("window", "none", [])
            : new ProcessingStep("window", o.Window == WindowShape.Exponential ? "exponential" : "Gaussian", [new("width_hz", o.WindowHz, "Hz")]));

        // 3. Zero filling and the transform.
        var spectrum = Transform(weighted, whole, size, fraction);
        steps.Add(new ProcessingStep("zero_fill", $"{n} acquired complex points to {size}", [new("acquired_points", n, "points"), new("points", size, "points")]));
        steps.Add(new ProcessingStep("fourier_transform", "complex FFT (MathNet.Numerics)", [new("spectral_width_hz", sw, "Hz")]));

        // 4. Phase.
        double p0, p1;
        string phaseHow;
        if (o.AutomaticPhase)
        {
            var phasing = size <= PhasingPoints ? spectrum : Transform(weighted, whole, NextPowerOfTwo(Math.Min(n, PhasingPoints)), fraction);
            (p0, p1) = MinimumEntropyPhasing.Find(phasing);
            phaseHow = "automatic, minimum entropy (Chen et al., J. Magn. Reson. 158, 164, 2002)";
        }
        else
        {
            (p0, p1) = (o.ZeroOrderPhaseDeg ?? 0, o.FirstOrderPhaseDeg ?? 0);
            phaseHow = "given";
        }
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

    private static double[] Window(ProcessingOptions o, int n, double dwell, double fraction)
    {
        var w = new double[n];
        for (var k = 0; k < n; k++)
        {
            // Time since time zero; the fraction of a point still to be removed puts it slightly earlier or later.
            var t = Math.Max(0, (k - fraction) * dwell);
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
    /// The spectrum in ascending frequency (the carrier at index size/2): the signal from time zero (point
    /// <paramref name="whole"/>) at the start of a buffer of <paramref name="size"/> points, truncated if longer, and the
    /// filter's build-up before time zero at the buffer's end, where a circular transform puts negative times; then the
    /// remaining fraction of a point of delay removed as a linear phase.
    /// </summary>
    private static Complex[] Transform(Complex[] fid, int whole, int size, double fraction)
    {
        var data = new Complex[size];
        var signal = Math.Min(fid.Length - whole, size - whole);
        Array.Copy(fid, whole, data, 0, signal);
        Array.Copy(fid, 0, data, size - whole, whole);
        Fourier.Forward(data, FourierOptions.Matlab);
        var spectrum = new Complex[size];
        var half = size / 2;
        for (var k = 0; k < size; k++)
        {
            var z = data[(k + half) % size];
            // A delay of `fraction` points multiplies the spectrum by exp(-2 pi i f fraction dwell); undo it.
            if (fraction != 0) z *= Complex.FromPolarCoordinates(1, 2 * Math.PI * fraction * (k - half) / size);
            spectrum[k] = z;
        }
        return spectrum;
    }
}
