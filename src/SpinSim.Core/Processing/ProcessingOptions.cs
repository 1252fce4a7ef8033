namespace SpinSim.Core.Processing;

/// <summary>The weighting applied to an FID before the Fourier transform.</summary>
public enum WindowShape
{
    /// <summary>No weighting.</summary>
    None,

    /// <summary>exp(-pi W t): adds a Lorentzian width of W Hz (full width at half maximum) to every line.</summary>
    Exponential,

    /// <summary>exp(-(pi W t)^2 / (4 ln 2)): convolves every line with a Gaussian of full width W Hz.</summary>
    Gaussian,
}

/// <summary>
/// How an FID becomes a spectrum. Every value left null is chosen by SpinSim and recorded in the
/// <see cref="ProcessingRecord"/>: the filter delay from the file or the data, the phases by minimum entropy, the size
/// from <see cref="DefaultPoints"/>.
/// </summary>
public sealed record ProcessingOptions
{
    /// <summary>The default window: exponential, 0.3 Hz (common practice, no source: a small broadening that tames truncation and noise).</summary>
    public const double DefaultWindowHz = 0.3;

    public WindowShape Window { get; init; } = WindowShape.Exponential;

    /// <summary>Width the window adds, in Hz (full width at half maximum); ignored for <see cref="WindowShape.None"/>.</summary>
    public double WindowHz { get; init; } = DefaultWindowHz;

    /// <summary>Number of complex points after zero filling (a power of two at least the acquired count); null: <see cref="DefaultPoints"/>.</summary>
    public int? Points { get; init; }

    /// <summary>The digital-filter delay in points; null: the file's value, or else found from the data.</summary>
    public double? FilterDelayPoints { get; init; }

    /// <summary>Zero-order phase in degrees at the centre of the spectral window; null (with <see cref="FirstOrderPhaseDeg"/> null): automatic.</summary>
    public double? ZeroOrderPhaseDeg { get; init; }

    /// <summary>First-order phase in degrees: the change from the low- to the high-frequency edge of the window.</summary>
    public double? FirstOrderPhaseDeg { get; init; }

    /// <summary>Order of the polynomial baseline removed after phasing (0 to 5), or null for none.</summary>
    public int? BaselineOrder { get; init; }

    public const int MaxPoints = 1 << 22;

    /// <summary>
    /// The default size: the next power of two at or above twice the acquired points (one zero filling keeps the
    /// information of the imaginary half; common practice, no source), and at least 65,536 so that a line of 1 Hz on a
    /// 20 kHz window spans several points for fitting.
    /// </summary>
    public static int DefaultPoints(int acquired) => Math.Max(FidProcessor.NextPowerOfTwo(2 * acquired), 65536);

    public const int MaxBaselineOrder = 5;

    /// <summary>Every problem with these options, as sentences naming the option; empty when usable.</summary>
    public IReadOnlyList<string> Problems()
    {
        var problems = new List<string>();
        if (!(double.IsFinite(WindowHz) && WindowHz >= 0 && WindowHz <= 100))
            problems.Add($"the window width must be from 0 to 100 Hz, got {WindowHz}");
        if (Points is { } n && (n < FreeInductionDecay.MinPoints || n > MaxPoints || (n & (n - 1)) != 0))
            problems.Add($"the number of points must be a power of two from {FreeInductionDecay.MinPoints} to {MaxPoints}, got {n}");
        if (FilterDelayPoints is { } d && !(double.IsFinite(d) && d >= 0 && d <= 1000))
            problems.Add($"the filter delay must be from 0 to 1000 points, got {d}");
        if (ZeroOrderPhaseDeg is { } p0 && !double.IsFinite(p0)) problems.Add("the zero-order phase must be a finite number of degrees");
        if (FirstOrderPhaseDeg is { } p1 && !double.IsFinite(p1)) problems.Add("the first-order phase must be a finite number of degrees");
        if (BaselineOrder is { } b && (b < 0 || b > MaxBaselineOrder))
            problems.Add($"the baseline order must be from 0 to {MaxBaselineOrder}, got {b}");
        return problems;
    }

    /// <summary>True when the phases are to be found by SpinSim.</summary>
    public bool AutomaticPhase => ZeroOrderPhaseDeg is null && FirstOrderPhaseDeg is null;
}
