using System.Globalization;

namespace SpinSim.Core.Processing;

/// <summary>One number of a processing step: its name (snake_case, unit in the name), value and unit.</summary>
public readonly record struct ProcessingValue(string Name, double Value, string Unit);

/// <summary>
/// One step applied to measured data, in the order applied: a name such as "filter_delay", a sentence saying how its
/// values were chosen (given by the user, stated in the file, found from the data), and the values used.
/// </summary>
public sealed record ProcessingStep(string Name, string How, IReadOnlyList<ProcessingValue> Values)
{
    public double? Value(string name)
    {
        foreach (var v in Values)
            if (v.Name == name) return v.Value;
        return null;
    }

    public bool Equals(ProcessingStep? other) =>
        other is not null && Name == other.Name && How == other.How && Values.SequenceEqual(other.Values);

    public override int GetHashCode() => HashCode.Combine(Name, How, Values.Count);

    /// <summary>"phase: automatic ... (zero_order_deg 12.3, first_order_deg -45.6)".</summary>
    public override string ToString()
    {
        var c = CultureInfo.InvariantCulture;
        var values = string.Join(", ", Values.Select(v => $"{v.Name} {v.Value.ToString("G6", c)}"));
        return values.Length == 0 ? $"{Name}: {How}" : $"{Name}: {How} ({values})";
    }
}

/// <summary>
/// Everything done to measured data between the file and the trace that is fitted or drawn: for a time-domain FID the
/// filter delay, window, zero filling, Fourier transform, phases (in degrees) and baseline; for any trace, the
/// re-referencing. Immutable; carried by <see cref="Traces.TraceOrigin.Processing"/> so that every report can state it.
/// </summary>
public sealed record ProcessingRecord(string Kind, IReadOnlyList<ProcessingStep> Steps)
{
    /// <summary>The kind of data read from the file: a spectrum.</summary>
    public const string SpectrumKind = "spectrum";

    /// <summary>The kind of data read from the file: a time-domain free induction decay.</summary>
    public const string FidKind = "fid";

    public ProcessingStep? Step(string name) => Steps.FirstOrDefault(s => s.Name == name);

    /// <summary>The shift added to every point's ppm by re-referencing, 0 when the trace was not re-referenced.</summary>
    public double ReferencePpmShift => Step(ReferenceStepName)?.Value("shift_ppm") ?? 0;

    public const string ReferenceStepName = "reference";

    /// <summary>This record with <paramref name="step"/> appended.</summary>
    public ProcessingRecord With(ProcessingStep step) => this with { Steps = [.. Steps, step] };

    public bool Equals(ProcessingRecord? other) => other is not null && Kind == other.Kind && Steps.SequenceEqual(other.Steps);

    public override int GetHashCode() => HashCode.Combine(Kind, Steps.Count);

    /// <summary>One line per step.</summary>
    public IEnumerable<string> Describe() => Steps.Select(s => s.ToString());
}
