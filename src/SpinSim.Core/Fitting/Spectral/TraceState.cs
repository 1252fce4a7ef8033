using SpinSim.Core.Spectrum;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// The values that draw one trace of the fit model at one point of the parameters: scale, baseline terms, offset, the
/// two phase terms and the widths. Each parameter writes its value here through its kind's
/// <see cref="ParameterKindInfo.EntersTrace"/>; <see cref="SpectralModel"/> reads it to draw the lines.
/// </summary>
/// <param name="entries">Number of entries of the system (for widths per entry).</param>
internal sealed class TraceState(int entries)
{
    private double[]? _perEntryWidth;

    public double Scale { get; set; } = 1;
    public double OffsetHz { get; set; }
    public double PhaseDeg { get; set; }
    public double PhaseDegPerPpm { get; set; }

    /// <summary>The common width of the trace (NaN when the fit has only widths per entry).</summary>
    public double GlobalWidth { get; set; } = double.NaN;

    public List<(int Order, double Value)> Baseline { get; } = [];

    /// <summary>Widths per entry, created when the first is written.</summary>
    public double[] PerEntryWidth => _perEntryWidth ??= new double[entries];

    public double[]? PerEntryWidthOrNull => _perEntryWidth;

    /// <summary>The full parameter index each per-trace value with an analytic column came from.</summary>
    public Dictionary<ParameterKind, int> Sources { get; } = [];

    /// <summary>The full index <paramref name="kind"/>'s value came from, -1 when the trace has none.</summary>
    public int SourceOf(ParameterKind kind) => Sources.TryGetValue(kind, out var i) ? i : -1;

    /// <summary>Entries without a width of their own take the common width (or 1 Hz when there is none).</summary>
    public void CompletePerEntryWidths()
    {
        if (_perEntryWidth is null) return;
        for (var e = 0; e < _perEntryWidth.Length; e++)
            if (_perEntryWidth[e] == 0) _perEntryWidth[e] = double.IsNaN(GlobalWidth) ? 1.0 : GlobalWidth;
    }

    /// <summary>The phase of this trace across its fitted points, pivoting about the centre of its regions.</summary>
    public PhaseRamp Ramp(PreparedData data) => new(PhaseDeg, PhaseDegPerPpm / data.ObserveMHz, data.BaselineCentrePpm * data.ObserveMHz, data.ObserveMHz);
}

/// <summary>
/// Zero- and first-order phase of one trace: a line centred at ν (Hz) is drawn with the phase
/// φ(ν) = φ0 + φ1 (ν - pivot) / SF, φ1 in degrees per ppm, SF the observe frequency in MHz.
/// </summary>
/// <remarks>
/// The phase is taken at each line's centre and held across the line. A first-order phase error turns every point by
/// the phase at its own frequency; the two agree wherever the line has weight, since the ramp changes by φ1 w / SF
/// across a line of width w (1 °/ppm over a 1 Hz line at 60 MHz: 0.017°). Only in the far wings, below 1e-3 of the
/// line's height, does the difference reach a degree, so for lines narrow against the ramp this is exact for practical
/// purposes, and it keeps each line one phased profile with analytic derivatives.
/// </remarks>
internal readonly struct PhaseRamp
{
    private readonly PhaseRotation _level;

    public PhaseRamp(double phaseDeg, double degPerHz, double pivotHz, double observeMHz)
    {
        PhaseDeg = phaseDeg;
        DegPerHz = degPerHz;
        PivotHz = pivotHz;
        ObserveMHz = observeMHz;
        _level = PhaseRotation.FromDegrees(phaseDeg);
    }

    /// <summary>Zero-order phase at the pivot, in degrees.</summary>
    public double PhaseDeg { get; }

    /// <summary>First-order phase in degrees per Hz of line position.</summary>
    public double DegPerHz { get; }

    public double PivotHz { get; }
    public double ObserveMHz { get; }

    /// <summary>The rotation a line centred at <paramref name="centreHz"/> is drawn with.</summary>
    public PhaseRotation At(double centreHz) =>
        DegPerHz == 0 ? _level : PhaseRotation.FromDegrees(PhaseDeg + DegPerHz * (centreHz - PivotHz));

    /// <summary>dφ/dφ1 at a line: its distance from the pivot in ppm.</summary>
    public double LeverPpm(double centreHz) => (centreHz - PivotHz) / ObserveMHz;
}
