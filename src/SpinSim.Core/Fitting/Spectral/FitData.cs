using System.Numerics;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Core.Traces;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>A ppm interval, given in either order.</summary>
public readonly record struct PpmRange(double A, double B)
{
    public double High => Math.Max(A, B);
    public double Low => Math.Min(A, B);
    public bool Contains(double ppm) => ppm >= Low && ppm <= High;
    public override string ToString() => $"{High:0.####} to {Low:0.####} ppm";
}

/// <summary>A measured trace and the parts of it that a fit uses: the regions, less the excluded intervals.</summary>
public sealed record FitDataset(SpectrumTrace Trace, IReadOnlyList<PpmRange> Regions, IReadOnlyList<PpmRange> Exclude)
{
    /// <summary>True when the regions were worked out from the start's lines rather than given.</summary>
    public bool RegionsAutomatic { get; init; }

    /// <summary>How the data were turned into this spectrum (from a time-domain signal), one step a line; empty for a spectrum as read.</summary>
    public IReadOnlyList<string> Processing { get; init; } = [];

    public double ObserveMHz => Trace.ObserveMHz ?? throw new InvalidOperationException("a fitted trace needs its observe frequency");

    /// <summary>
    /// The centre of the fitted regions, in ppm: the middle of the baseline polynomial's variable and the pivot of the
    /// first-order phase (about which that phase barely correlates with the zero-order one).
    /// </summary>
    public double CentrePpm => (Regions.Max(r => r.High) + Regions.Min(r => r.Low)) / 2;
}

/// <summary>
/// The fitted points of one dataset in ascending Hz, intensities divided by the largest |y| in the regions (so that
/// traces of a joint fit weigh alike and the scale parameter is near 1), and a smoothed copy for broad-line stages.
/// </summary>
internal sealed class PreparedData
{
    public readonly double[] Hz;
    public readonly double[] Ppm;
    public readonly double[] Y;
    public readonly double ObserveMHz;
    public readonly double Normalisation;
    public readonly double BaselineCentrePpm;
    public readonly double BaselineHalfSpanPpm;
    public readonly int[] TraceIndex;

    /// <summary>The baseline polynomial's variable at each point: (ppm - centre) / half-span, from -1 to 1.</summary>
    public readonly double[] BaselineX;

    private PreparedData(double[] hz, double[] ppm, double[] y, double observeMHz, double normalisation, double centre, double halfSpan, int[] traceIndex)
    {
        Hz = hz; Ppm = ppm; Y = y; ObserveMHz = observeMHz; Normalisation = normalisation;
        BaselineCentrePpm = centre; BaselineHalfSpanPpm = halfSpan; TraceIndex = traceIndex;
        BaselineX = ppm.Select(p => (p - centre) / halfSpan).ToArray();
    }

    /// <summary>x^order at every point (the baseline's derivative with respect to its coefficient of that order).</summary>
    public double[] BaselinePower(int order)
    {
        var result = new double[Count];
        for (var i = 0; i < result.Length; i++)
        {
            var v = 1.0;
            for (var k = 0; k < order; k++) v *= BaselineX[i];
            result[i] = v;
        }
        return result;
    }

    public int Count => Hz.Length;

    public static PreparedData From(FitDataset data)
    {
        var t = data.Trace;
        var mhz = data.ObserveMHz;
        var selected = Enumerable.Range(0, t.Count)
            .Where(i => data.Regions.Any(r => r.Contains(t.ShiftPpm[i])) && !data.Exclude.Any(r => r.Contains(t.ShiftPpm[i])))
            .OrderBy(i => t.ShiftPpm[i]).ToArray();
        var norm = selected.Length == 0 ? 1 : selected.Max(i => Math.Abs(t.Intensity[i]));
        if (norm == 0) norm = 1;
        var high = data.Regions.Max(r => r.High);
        var low = data.Regions.Min(r => r.Low);
        return new PreparedData(
            selected.Select(i => t.ShiftPpm[i] * mhz).ToArray(),
            selected.Select(i => t.ShiftPpm[i]).ToArray(),
            selected.Select(i => t.Intensity[i] / norm).ToArray(),
            mhz, norm, data.CentrePpm, Math.Max((high - low) / 2, 1e-9), selected);
    }

    /// <summary>
    /// A copy whose intensities are convolved with an area-normalised Lorentzian of FWHM <paramref name="widthHz"/>
    /// (the model adds the same width to its lines), kept at every <paramref name="stride"/>-th point.
    /// </summary>
    public PreparedData Broadened(SpectrumTrace trace, double widthHz, int stride)
    {
        if (widthHz <= 0 && stride == 1) return this;
        var y = widthHz > 0 ? Convolve(trace, widthHz) : Y;
        var keep = Enumerable.Range(0, Count).Where(i => i % stride == 0).ToArray();
        return new PreparedData(keep.Select(i => Hz[i]).ToArray(), keep.Select(i => Ppm[i]).ToArray(), keep.Select(i => y[i]).ToArray(),
            ObserveMHz, Normalisation, BaselineCentrePpm, BaselineHalfSpanPpm, keep.Select(i => TraceIndex[i]).ToArray());
    }

    /// <summary>Lorentzian smoothing of the whole trace by FFT (circular, padded), sampled at the fitted points.</summary>
    private double[] Convolve(SpectrumTrace trace, double widthHz)
    {
        var n = trace.Count;
        var order = Enumerable.Range(0, n).OrderBy(i => trace.ShiftPpm[i]).ToArray();
        var stepHz = (trace.ShiftPpm[order[^1]] - trace.ShiftPpm[order[0]]) * ObserveMHz / (n - 1);
        var size = 1;
        while (size < 2 * n) size <<= 1;
        var signal = new Complex[size];
        for (var k = 0; k < n; k++) signal[k] = trace.Intensity[order[k]] / Normalisation;
        var kernel = new Complex[size];
        var half = widthHz / 2;
        double sum = 0;
        for (var k = 0; k < size; k++)
        {
            var offset = (k < size / 2 ? k : k - size) * stepHz;
            var v = half / Math.PI / (offset * offset + half * half) * stepHz;
            kernel[k] = v;
            sum += v;
        }
        for (var k = 0; k < size; k++) kernel[k] /= sum;
        Fft.Forward(signal);
        Fft.Forward(kernel);
        for (var k = 0; k < size; k++) signal[k] *= kernel[k];
        Fft.Inverse(signal);
        var smoothed = new double[n];
        for (var k = 0; k < n; k++) smoothed[order[k]] = signal[k].Real / size;
        return TraceIndex.Select(i => smoothed[i]).ToArray();
    }
}
