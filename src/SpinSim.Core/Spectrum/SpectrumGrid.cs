namespace SpinSim.Core.Spectrum;

/// <summary>
/// The sampling of a trace: <see cref="Points"/> points evenly spaced in ppm, point 0 at <see cref="FromPpm"/>
/// and the last at <see cref="ToPpm"/> (either order; spectra are usually drawn from high to low ppm).
/// </summary>
/// <remarks>
/// <see cref="ReferenceOffsetPpm"/> is where true 0 ppm sits on this axis: a line at delta ppm appears at
/// delta + offset. A measured spectrum whose solvent peak sits 0.04 ppm low has offset -0.04.
/// </remarks>
/// <exception cref="ArgumentException">Fewer than 2 points, a non-finite value, FromPpm equal to ToPpm, or a field that is not positive.</exception>
public sealed record SpectrumGrid(double FromPpm, double ToPpm, int Points, double ObserveMHz, double ReferenceOffsetPpm = 0)
{
    /// <summary>Smallest margin, in ppm, that <see cref="WindowFor"/> leaves beyond the outermost lines.</summary>
    public const double MinimumMarginPpm = 0.1;

    /// <summary>Margin in widths of the broadest line that <see cref="WindowFor"/> leaves when that is more than <see cref="MinimumMarginPpm"/>.</summary>
    public const double MarginFwhm = 10;

    public double FromPpm { get; } = Finite(FromPpm, nameof(FromPpm));

    public double ToPpm { get; } = Finite(ToPpm, nameof(ToPpm)) != FromPpm
        ? ToPpm
        : throw new ArgumentException($"FromPpm and ToPpm are both {ToPpm}: a grid needs a non-empty range", nameof(ToPpm));

    public int Points { get; } = Points >= 2
        ? Points
        : throw new ArgumentOutOfRangeException(nameof(Points), Points, "a grid needs at least 2 points");

    /// <summary>1H observe frequency in MHz; 1 ppm is this many Hz.</summary>
    public double ObserveMHz { get; } = Finite(ObserveMHz, nameof(ObserveMHz)) > 0
        ? ObserveMHz
        : throw new ArgumentOutOfRangeException(nameof(ObserveMHz), ObserveMHz, "the observe frequency must be positive");

    public double ReferenceOffsetPpm { get; } = Finite(ReferenceOffsetPpm, nameof(ReferenceOffsetPpm));

    /// <summary>ppm from one point to the next; negative when the axis runs from high to low ppm.</summary>
    public double StepPpm => (ToPpm - FromPpm) / (Points - 1);

    /// <summary>Hz from one point to the next; negative when the axis runs from high to low ppm.</summary>
    public double StepHz => StepPpm * ObserveMHz;

    /// <summary>The axis value of point <paramref name="index"/>, in ppm.</summary>
    public double PpmAt(int index)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(index);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(index, Points);
        // Interpolate rather than accumulate steps so that the last point is ToPpm exactly.
        return FromPpm + (ToPpm - FromPpm) * index / (Points - 1);
    }

    /// <summary>The frequency of point <paramref name="index"/> in Hz from true 0 ppm, the frame of <see cref="RenderLine.CentreHz"/>.</summary>
    public double HzAt(int index) => (PpmAt(index) - ReferenceOffsetPpm) * ObserveMHz;

    /// <summary>
    /// The default ppm window for a set of lines, from high to low ppm: every line plus a margin on each side
    /// of <see cref="MarginFwhm"/> widths of the broadest line or <see cref="MinimumMarginPpm"/>, whichever is larger.
    /// </summary>
    /// <remarks>
    /// 0.1 ppm keeps a sharp multiplet from touching the frame; ten widths keep broad lines from being cut
    /// where they are still visible (a Lorentzian is down to 0.25 % of its height there).
    /// </remarks>
    /// <exception cref="ArgumentException">No lines, a non-finite centre or width, or a field that is not positive.</exception>
    public static (double FromPpm, double ToPpm) WindowFor(ReadOnlySpan<RenderLine> lines, double observeMHz, double referenceOffsetPpm = 0)
    {
        if (lines.IsEmpty) throw new ArgumentException("no lines to frame", nameof(lines));
        if (!(observeMHz > 0) || !double.IsFinite(observeMHz))
            throw new ArgumentOutOfRangeException(nameof(observeMHz), observeMHz, "the observe frequency must be positive");
        double lowHz = double.PositiveInfinity, highHz = double.NegativeInfinity, broadestHz = 0;
        foreach (var line in lines)
        {
            if (!double.IsFinite(line.CentreHz) || !double.IsFinite(line.FwhmHz))
                throw new ArgumentException($"line at {line.CentreHz} Hz with width {line.FwhmHz} Hz is not finite", nameof(lines));
            lowHz = Math.Min(lowHz, line.CentreHz);
            highHz = Math.Max(highHz, line.CentreHz);
            broadestHz = Math.Max(broadestHz, line.FwhmHz);
        }
        double marginPpm = Math.Max(MinimumMarginPpm, MarginFwhm * broadestHz / observeMHz);
        return (highHz / observeMHz + referenceOffsetPpm + marginPpm, lowHz / observeMHz + referenceOffsetPpm - marginPpm);
    }

    /// <summary>A grid of <paramref name="points"/> points over <see cref="WindowFor"/> of the lines.</summary>
    public static SpectrumGrid Covering(ReadOnlySpan<RenderLine> lines, int points, double observeMHz, double referenceOffsetPpm = 0)
    {
        var (from, to) = WindowFor(lines, observeMHz, referenceOffsetPpm);
        return new SpectrumGrid(from, to, points, observeMHz, referenceOffsetPpm);
    }

    private static double Finite(double value, string name) =>
        double.IsFinite(value) ? value : throw new ArgumentOutOfRangeException(name, value, "must be a finite number");
}
