using System.Numerics;
using SpinSim.Core.Traces;

namespace SpinSim.Core.Processing;

/// <summary>
/// A measured time-domain signal (free induction decay) of one nucleus: complex points (real = one quadrature
/// channel, imaginary = the other) sampled every <see cref="DwellSeconds"/>, as a spectrometer records them. Immutable:
/// the constructor copies the points and callers must not write into <see cref="Points"/>.
/// </summary>
public sealed record FreeInductionDecay
{
    /// <param name="points">Complex samples, at least 16, finite.</param>
    /// <param name="dwellSeconds">Time between samples in seconds; the spectral width is its inverse.</param>
    /// <param name="observeMHz">Observe frequency of the nucleus in MHz (1 ppm = this many Hz).</param>
    /// <param name="nucleus">Observed nucleus, e.g. "1H".</param>
    /// <param name="highEdgePpm">
    /// Shift of the high-frequency edge of the spectral window (the first point of the spectrum as drawn, high ppm on the
    /// left), from the file's shift reference; null when the file gives none.
    /// </param>
    /// <param name="statedFilterDelayPoints">The digital-filter delay in points when the file states it, else null.</param>
    /// <param name="origin">Source, format and reader warnings.</param>
    /// <exception cref="ArgumentException">Too few points, a non-finite value, a non-positive dwell time or frequency.</exception>
    public FreeInductionDecay(Complex[] points, double dwellSeconds, double observeMHz, string nucleus, double? highEdgePpm,
        double? statedFilterDelayPoints, TraceOrigin origin)
    {
        ArgumentNullException.ThrowIfNull(points);
        ArgumentNullException.ThrowIfNull(origin);
        if (points.Length < MinPoints)
            throw new ArgumentException($"an FID needs at least {MinPoints} points, got {points.Length}", nameof(points));
        for (var i = 0; i < points.Length; i++)
            if (!double.IsFinite(points[i].Real) || !double.IsFinite(points[i].Imaginary))
                throw new ArgumentException($"point {i} of the FID is not finite", nameof(points));
        if (!(double.IsFinite(dwellSeconds) && dwellSeconds > 0))
            throw new ArgumentException($"the dwell time must be a positive number of seconds, got {dwellSeconds}", nameof(dwellSeconds));
        if (!(double.IsFinite(observeMHz) && observeMHz > 0))
            throw new ArgumentException($"the observe frequency must be a positive number of MHz, got {observeMHz}", nameof(observeMHz));
        if (string.IsNullOrWhiteSpace(nucleus))
            throw new ArgumentException("nucleus must be named, e.g. \"1H\"", nameof(nucleus));
        if (highEdgePpm is { } edge && !double.IsFinite(edge))
            throw new ArgumentException("the shift of the window's edge must be finite", nameof(highEdgePpm));
        if (statedFilterDelayPoints is { } d && !(double.IsFinite(d) && d >= 0 && d < points.Length / 2))
            throw new ArgumentException($"the filter delay must be from 0 to half the points, got {d}", nameof(statedFilterDelayPoints));
        Points = (Complex[])points.Clone();
        DwellSeconds = dwellSeconds;
        ObserveMHz = observeMHz;
        Nucleus = nucleus;
        HighEdgePpm = highEdgePpm;
        StatedFilterDelayPoints = statedFilterDelayPoints;
        Origin = origin;
    }

    public const int MinPoints = 16;

    public Complex[] Points { get; }

    public double DwellSeconds { get; }

    public double ObserveMHz { get; }

    public string Nucleus { get; }

    public double? HighEdgePpm { get; }

    public double? StatedFilterDelayPoints { get; }

    public TraceOrigin Origin { get; }

    public int Count => Points.Length;

    /// <summary>Spectral width in Hz: the inverse of the dwell time.</summary>
    public double SpectralWidthHz => 1 / DwellSeconds;

    /// <summary>Acquisition time in seconds.</summary>
    public double AcquisitionSeconds => Count * DwellSeconds;

    public bool Equals(FreeInductionDecay? other) =>
        other is not null && DwellSeconds == other.DwellSeconds && ObserveMHz == other.ObserveMHz && Nucleus == other.Nucleus
        && HighEdgePpm == other.HighEdgePpm && StatedFilterDelayPoints == other.StatedFilterDelayPoints
        && Points.AsSpan().SequenceEqual(other.Points) && Origin.Equals(other.Origin);

    public override int GetHashCode() => HashCode.Combine(Count, DwellSeconds, ObserveMHz, Nucleus);
}
