namespace SpinSim.Core.Spectrum;

/// <summary>
/// Draws lines onto a <see cref="SpectrumGrid"/> as a trace in area units per Hz, so that the trace integrated
/// over Hz gives the summed line areas (less the cut-off tails below).
/// </summary>
/// <remarks>
/// Each line is evaluated only within a window about its centre, so the cost grows with the lines times the
/// points per window, not times the whole grid. Lorentzian and Voigt lines are cut at
/// <c>cutoffFwhm</c> widths either side; the area a Lorentzian loses beyond +-K FWHM is
/// 1 - (2/pi) atan(2K) (see <see cref="LorentzianTailFraction"/>: 0.16 % at the default K = 200). A Voigt line
/// loses no more than that asymptotically, since its far tail is the Lorentzian of its narrower Lorentzian
/// component. Gaussian lines are cut at the smaller of K and <see cref="GaussianCutoffFwhm"/> widths, beyond
/// which less than 1e-31 of the area lies. All Voigt lines of one shape share one reduced profile, tabulated
/// near the centre with a short series in the wings; it agrees with the Faddeeva function to 1e-13 of the
/// peak at a few times the cost of a Lorentzian. Large jobs run in parallel over runs of lines, each into
/// its own buffer; the result depends on the machine's core count (in the last bits), never on thread timing.
/// </remarks>
public static class TraceSynthesizer
{
    /// <summary>Default half-window, in FWHM of each line, for Lorentzian and Voigt lines.</summary>
    public const double DefaultCutoffFwhm = 200;

    /// <summary>Half-window, in FWHM, past which a Gaussian line is not evaluated: 11.8 sigma, where erfc leaves 2.5e-32 of the area.</summary>
    public const double GaussianCutoffFwhm = 5;

    // Below this many profile evaluations a second thread costs more than it saves.
    private const long ParallelThresholdEvaluations = 400_000;

    /// <inheritdoc cref="Render(ReadOnlySpan{RenderLine}, SpectrumGrid, Lineshape, double)"/>
    /// <remarks>A Voigt gets equal Lorentzian and Gaussian components (<see cref="Lineshape.FromKind"/>).</remarks>
    public static double[] Render(ReadOnlySpan<RenderLine> lines, SpectrumGrid grid, LineshapeKind shape, double cutoffFwhm = DefaultCutoffFwhm) =>
        Render(lines, grid, Lineshape.FromKind(shape), cutoffFwhm);

    /// <summary>The trace of <paramref name="lines"/> on <paramref name="grid"/>, one value per grid point, in area units per Hz.</summary>
    /// <param name="cutoffFwhm">Half-window K, in FWHM of each line, beyond which a line is not evaluated; at least 1.</param>
    /// <exception cref="ArgumentException">A line with a non-finite centre or area, or a width that is not positive and finite; or K below 1.</exception>
    public static double[] Render(ReadOnlySpan<RenderLine> lines, SpectrumGrid grid, Lineshape shape, double cutoffFwhm = DefaultCutoffFwhm)
    {
        ArgumentNullException.ThrowIfNull(grid);
        ArgumentNullException.ThrowIfNull(shape);
        if (!(cutoffFwhm >= 1))
            throw new ArgumentOutOfRangeException(nameof(cutoffFwhm), cutoffFwhm, "the cut-off must be at least 1 FWHM");
        Validate(lines);

        var axis = new Axis(grid);
        var trace = new double[grid.Points];
        var cumulativeWork = new long[lines.Length + 1];
        for (int i = 0; i < lines.Length; i++)
        {
            var (first, last) = axis.Window(lines[i], HalfWindowHz(lines[i], shape, cutoffFwhm));
            cumulativeWork[i + 1] = cumulativeWork[i] + Math.Max(0, last - first + 1);
        }
        long work = cumulativeWork[^1];

        int threads = (int)Math.Min(Environment.ProcessorCount, work / ParallelThresholdEvaluations);
        if (threads <= 1)
        {
            foreach (var line in lines)
                Draw(line, shape, cutoffFwhm, axis, trace);
            return trace;
        }

        // Contiguous runs of lines with equal work, each into its own buffer, summed in order: the result
        // depends on the number of threads only, never on their timing.
        var bounds = new int[threads + 1];
        for (int t = 1; t < threads; t++)
        {
            int at = Array.BinarySearch(cumulativeWork, work * t / threads);
            bounds[t] = at >= 0 ? at : ~at;
        }
        bounds[threads] = lines.Length;

        // A span cannot enter the lambda; the copy is small beside the trace work.
        var all = lines.ToArray();
        var buffers = new double[threads][];
        buffers[0] = trace;
        Parallel.For(0, threads, new ParallelOptions { MaxDegreeOfParallelism = threads }, t =>
        {
            var buffer = t == 0 ? trace : buffers[t] = new double[trace.Length];
            for (int i = bounds[t]; i < bounds[t + 1]; i++)
                Draw(all[i], shape, cutoffFwhm, axis, buffer);
        });
        for (int t = 1; t < threads; t++)
        {
            var buffer = buffers[t];
            for (int i = 0; i < trace.Length; i++)
                trace[i] += buffer[i];
        }
        return trace;
    }

    /// <summary>Fraction of a Lorentzian's area beyond +-K FWHM of its centre: 1 - (2/pi) atan(2K).</summary>
    public static double LorentzianTailFraction(double cutoffFwhm) =>
        // Written as (2/pi) atan(1/(2K)), equal for K > 0, to avoid cancellation at large K.
        2 / Math.PI * Math.Atan(0.5 / cutoffFwhm);

    private static void Validate(ReadOnlySpan<RenderLine> lines)
    {
        for (int i = 0; i < lines.Length; i++)
        {
            var line = lines[i];
            if (!double.IsFinite(line.CentreHz) || !double.IsFinite(line.Area))
                throw new ArgumentException($"line {i}: centre {line.CentreHz} Hz and area {line.Area} must be finite", nameof(lines));
            if (!(line.FwhmHz > 0) || !double.IsFinite(line.FwhmHz))
                throw new ArgumentException($"line {i}: width {line.FwhmHz} Hz must be positive and finite", nameof(lines));
        }
    }

    private static double HalfWindowHz(RenderLine line, Lineshape shape, double cutoffFwhm) =>
        (shape.Kind == LineshapeKind.Gaussian ? Math.Min(cutoffFwhm, GaussianCutoffFwhm) : cutoffFwhm) * line.FwhmHz;

    private static void Draw(RenderLine line, Lineshape shape, double cutoffFwhm, Axis axis, double[] trace)
    {
        var (first, last) = axis.Window(line, HalfWindowHz(line, shape, cutoffFwhm));
        if (first > last) return;
        var profile = shape.Profile(line.FwhmHz, tabulated: true);
        double offset0 = axis.FirstHz - line.CentreHz;
        for (int i = first; i <= last; i++)
            trace[i] += line.Area * profile.Absorption(offset0 + i * axis.StepHz);
    }

    /// <summary>The grid's points as Hz from true 0 ppm: FirstHz + i StepHz.</summary>
    private readonly struct Axis(SpectrumGrid grid)
    {
        public readonly double FirstHz = grid.HzAt(0);
        public readonly double StepHz = grid.StepHz;
        private readonly int _points = grid.Points;

        /// <summary>First and last point within halfWindowHz of the centre; first &gt; last when none is.</summary>
        public (int First, int Last) Window(RenderLine line, double halfWindowHz)
        {
            double a = (line.CentreHz - halfWindowHz - FirstHz) / StepHz;
            double b = (line.CentreHz + halfWindowHz - FirstHz) / StepHz;
            double low = Math.Max(Math.Ceiling(Math.Min(a, b)), 0);
            double high = Math.Min(Math.Floor(Math.Max(a, b)), _points - 1);
            return low > high ? (1, 0) : ((int)low, (int)high);
        }
    }
}
