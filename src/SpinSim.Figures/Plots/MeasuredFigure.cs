using System.Globalization;
using OxyPlot;
using SpinSim.Core.Traces;

namespace SpinSim.Figures.Plots;

/// <summary>A measured trace as read (or as processed from an FID) over a chosen ppm range, to check an import by eye.</summary>
public static class MeasuredFigure
{
    private const string TraceAxis = "trace";

    /// <summary>Traces longer than this are drawn as the smallest and largest point of each of this many / 2 bins (every peak top and dip kept).</summary>
    public const int MaxDrawnPoints = 8000;

    /// <summary>
    /// The figure of <paramref name="trace"/> between <paramref name="fromPpm"/> and <paramref name="toPpm"/> (either order;
    /// null for the trace's own ends), high ppm on the left, with the intensity scale of the points shown.
    /// </summary>
    /// <exception cref="ArgumentException">No point of the trace lies in the range.</exception>
    public static PlotModel Create(SpectrumTrace trace, double? fromPpm, double? toPpm, FigureOptions options, string? subtitle = null)
    {
        ArgumentNullException.ThrowIfNull(trace);
        ArgumentNullException.ThrowIfNull(options);
        var (traceMin, traceMax) = FigureStyle.Range(trace.ShiftPpm);
        var low = Math.Min(fromPpm ?? traceMax, toPpm ?? traceMin);
        var high = Math.Max(fromPpm ?? traceMax, toPpm ?? traceMin);
        if (fromPpm is null && toPpm is null) (low, high) = (traceMin, traceMax);
        var inside = Enumerable.Range(0, trace.Count).Where(i => trace.ShiftPpm[i] >= low && trace.ShiftPpm[i] <= high).ToArray();
        if (inside.Length < 2)
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"no part of the trace lies between {low:0.###} and {high:0.###} ppm; it runs from {traceMin:0.###} to {traceMax:0.###} ppm"));
        var ppm = inside.Select(i => trace.ShiftPpm[i]).ToArray();
        var y = inside.Select(i => trace.Intensity[i]).ToArray();
        (ppm, y) = Thin(ppm, y);

        var field = trace.ObserveMHz is { } mhz ? FormattableString.Invariant($" at {mhz:0.#} MHz") : "";
        var kind = trace.Origin.Processing?.Kind == "fid" ? "processed from the FID" : "as read";
        var model = FigureStyle.NewModel(options, $"{Path.GetFileName(trace.Origin.Source)}: {FigureStyle.NucleusLabel(trace.Nucleus)} spectrum{field}, {kind}");
        if (subtitle is not null) model.Subtitle = subtitle;
        model.Axes.Add(FigureStyle.PpmAxis(trace.Nucleus, low, high));
        var (yMin, yMax) = FigureStyle.Range(y);
        if (yMax <= yMin) yMax = yMin + 1;
        var pad = 0.04 * (yMax - yMin);
        model.Axes.Add(FigureStyle.HiddenVerticalAxis(TraceAxis, yMin - pad, yMax + pad));
        model.Series.Add(FigureStyle.Line(FigureStyle.Points(ppm, y), FigurePalette.Measured, LineStyle.Solid, FigureStyle.TraceThickness, TraceAxis,
            "measured"));
        return model;
    }

    /// <summary>Min-max thinning to about <see cref="MaxDrawnPoints"/> points, in the stored order.</summary>
    private static (double[] Ppm, double[] Y) Thin(double[] ppm, double[] y)
    {
        if (ppm.Length <= MaxDrawnPoints) return (ppm, y);
        var bins = MaxDrawnPoints / 2;
        var xs = new List<double>(MaxDrawnPoints);
        var ys = new List<double>(MaxDrawnPoints);
        for (var b = 0; b < bins; b++)
        {
            var start = (int)((long)b * ppm.Length / bins);
            var end = (int)((long)(b + 1) * ppm.Length / bins);
            if (end <= start) continue;
            int lo = start, hi = start;
            for (var i = start; i < end; i++)
            {
                if (y[i] < y[lo]) lo = i;
                if (y[i] > y[hi]) hi = i;
            }
            foreach (var i in lo < hi ? new[] { lo, hi } : lo == hi ? new[] { lo } : new[] { hi, lo })
            {
                xs.Add(ppm[i]);
                ys.Add(y[i]);
            }
        }
        return (xs.ToArray(), ys.ToArray());
    }
}
