using SpinSim.Core.Processing;
using SpinSim.Core.Units;

namespace SpinSim.Core.Traces;

/// <summary>
/// Where a trace came from and what its reader noticed on the way: the source (file name or a
/// description such as "simulated"), the format ("JCAMP-DX 5.01", "delimited text"), the data form
/// ("XYDATA (X++(Y..Y)) SQZ+DIF"), the warnings raised while reading, and the header labels worth
/// keeping (label as written, value as written); for processed or re-referenced data, the <see cref="Processing"/> record.
/// </summary>
public sealed record TraceOrigin(
    string Source,
    string Format,
    string Form,
    IReadOnlyList<string> Warnings,
    IReadOnlyDictionary<string, string> HeaderLabels)
{
    private static readonly IReadOnlyDictionary<string, string> NoLabels = new Dictionary<string, string>();

    /// <summary>What was done to the data after reading (FID processing, re-referencing), or null when nothing was.</summary>
    public ProcessingRecord? Processing { get; init; }

    /// <summary>An origin for data that did not come from a file (a simulation, a test).</summary>
    public static TraceOrigin Describe(string source, string format = "in memory", string form = "") =>
        new(source, format, form, [], NoLabels);

    // Records compare collections by reference; two origins that say the same thing should be equal.
    public bool Equals(TraceOrigin? other) =>
        other is not null
        && Source == other.Source && Format == other.Format && Form == other.Form
        && Equals(Processing, other.Processing)
        && Warnings.SequenceEqual(other.Warnings)
        && HeaderLabels.Count == other.HeaderLabels.Count
        && HeaderLabels.All(kv => other.HeaderLabels.TryGetValue(kv.Key, out var v) && v == kv.Value);

    public override int GetHashCode() => HashCode.Combine(Source, Format, Form, Warnings.Count, HeaderLabels.Count);
}

/// <summary>
/// One 1D spectrum trace, measured or simulated: intensities on a chemical-shift axis in ppm, kept in
/// the order stored (a file's axis may run from high to low ppm). Immutable: the constructor copies the
/// arrays it is given and callers must not write into <see cref="ShiftPpm"/> or <see cref="Intensity"/>.
/// </summary>
public sealed record SpectrumTrace
{
    /// <param name="shiftPpm">Chemical shift of each point in ppm, any order, finite.</param>
    /// <param name="intensity">Intensity of each point in arbitrary units, finite, same length.</param>
    /// <param name="observeMHz">Observe frequency of <paramref name="nucleus"/> in MHz (1 ppm = this many Hz), or null if unknown.</param>
    /// <param name="nucleus">Observed nucleus as mass number and symbol, e.g. "1H".</param>
    /// <param name="origin">Source, format and reader warnings.</param>
    /// <exception cref="ArgumentException">Lengths differ, no points, a non-finite value, a non-positive observe frequency or an empty nucleus.</exception>
    public SpectrumTrace(double[] shiftPpm, double[] intensity, double? observeMHz, string nucleus, TraceOrigin origin)
    {
        ArgumentNullException.ThrowIfNull(shiftPpm);
        ArgumentNullException.ThrowIfNull(intensity);
        ArgumentNullException.ThrowIfNull(origin);
        if (shiftPpm.Length != intensity.Length)
            throw new ArgumentException($"shift axis has {shiftPpm.Length} points but intensity has {intensity.Length}; they must be equal", nameof(intensity));
        if (shiftPpm.Length == 0)
            throw new ArgumentException("a trace needs at least one point", nameof(shiftPpm));
        ThrowIfNotFinite(shiftPpm, nameof(shiftPpm));
        ThrowIfNotFinite(intensity, nameof(intensity));
        if (observeMHz is { } mhz && !(double.IsFinite(mhz) && mhz > 0))
            throw new ArgumentException($"observe frequency must be a positive number of MHz, got {mhz}", nameof(observeMHz));
        if (string.IsNullOrWhiteSpace(nucleus))
            throw new ArgumentException("nucleus must be named, e.g. \"1H\"", nameof(nucleus));

        ShiftPpm = (double[])shiftPpm.Clone();
        Intensity = (double[])intensity.Clone();
        ObserveMHz = observeMHz;
        Nucleus = nucleus;
        Origin = origin;
    }

    /// <summary>Chemical shift of each point in ppm, in stored order. Read only.</summary>
    public double[] ShiftPpm { get; }

    /// <summary>Intensity of each point in arbitrary units. Read only.</summary>
    public double[] Intensity { get; }

    /// <summary>Observe frequency of the nucleus in MHz, or null when the source did not state it.</summary>
    public double? ObserveMHz { get; }

    public string Nucleus { get; }

    public TraceOrigin Origin { get; }

    public int Count => ShiftPpm.Length;

    public ShiftPpm ShiftAt(int index) => new(ShiftPpm[index]);

    /// <summary>Frequency of point <paramref name="index"/> with 0 Hz at 0 ppm.</summary>
    /// <exception cref="InvalidOperationException">The observe frequency is unknown.</exception>
    public FrequencyHz FrequencyAt(int index) => FieldMHz.ToHz(ShiftAt(index), RequireObserveMHz());

    /// <summary>The axis in Hz (0 Hz at 0 ppm), a new array.</summary>
    /// <exception cref="InvalidOperationException">The observe frequency is unknown.</exception>
    public double[] FrequencyHzAxis()
    {
        var mhz = RequireObserveMHz();
        var hz = new double[Count];
        for (var i = 0; i < hz.Length; i++) hz[i] = ShiftPpm[i] * mhz;
        return hz;
    }

    /// <summary>True when ppm never decreases along the stored order.</summary>
    public bool IsAscending
    {
        get
        {
            for (var i = 1; i < ShiftPpm.Length; i++)
                if (ShiftPpm[i] < ShiftPpm[i - 1]) return false;
            return true;
        }
    }

    /// <summary>The same points ordered by increasing ppm (this trace when already so). Ties keep their stored order.</summary>
    public SpectrumTrace SortedAscending()
    {
        if (IsAscending) return this;
        var order = Enumerable.Range(0, Count).OrderBy(i => ShiftPpm[i]).ToArray();
        var ppm = new double[Count];
        var y = new double[Count];
        for (var k = 0; k < order.Length; k++)
        {
            ppm[k] = ShiftPpm[order[k]];
            y[k] = Intensity[order[k]];
        }
        return new SpectrumTrace(ppm, y, ObserveMHz, Nucleus, Origin);
    }

    // Value equality over the points, which records would otherwise compare by array reference.
    public bool Equals(SpectrumTrace? other) =>
        other is not null
        && ObserveMHz == other.ObserveMHz && Nucleus == other.Nucleus
        && ShiftPpm.AsSpan().SequenceEqual(other.ShiftPpm)
        && Intensity.AsSpan().SequenceEqual(other.Intensity)
        && Origin.Equals(other.Origin);

    public override int GetHashCode() => HashCode.Combine(Count, ShiftPpm[0], Intensity[0], ObserveMHz, Nucleus);

    private double RequireObserveMHz() =>
        ObserveMHz ?? throw new InvalidOperationException("the observe frequency is unknown, so the Hz axis cannot be computed");

    private static void ThrowIfNotFinite(double[] values, string name)
    {
        for (var i = 0; i < values.Length; i++)
            if (!double.IsFinite(values[i]))
                throw new ArgumentException($"{name}[{i}] is {values[i]}; every value must be finite", name);
    }
}
