using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Text.Json.Serialization;
using SpinSim.Core.Processing;
using SpinSim.Core.Traces;

namespace SpinSim.Formats;

/// <summary>
/// What a trace is, in a few numbers: for printing as text or as JSON with snake_case keys
/// (format, form, points, ppm_first, ppm_last, hz_first, hz_last, observe_mhz, nucleus, y_min, y_max, warnings, kind,
/// processing, reference_ppm_shift). Hz values are null when the observe frequency is unknown. <c>kind</c> is "spectrum"
/// or "fid" (then the numbers describe the processed trace); <c>processing</c> lists the steps applied with their values
/// (phases in degrees), empty for a spectrum used as read.
/// </summary>
public sealed record TraceSummary(
    [property: JsonPropertyName("format")] string Format,
    [property: JsonPropertyName("form")] string Form,
    [property: JsonPropertyName("points")] int Points,
    [property: JsonPropertyName("ppm_first")] double PpmFirst,
    [property: JsonPropertyName("ppm_last")] double PpmLast,
    [property: JsonPropertyName("hz_first")] double? HzFirst,
    [property: JsonPropertyName("hz_last")] double? HzLast,
    [property: JsonPropertyName("observe_mhz")] double? ObserveMHz,
    [property: JsonPropertyName("nucleus")] string Nucleus,
    [property: JsonPropertyName("y_min")] double YMin,
    [property: JsonPropertyName("y_max")] double YMax,
    [property: JsonPropertyName("warnings")] IReadOnlyList<string> Warnings,
    [property: JsonPropertyName("kind")] string Kind,
    [property: JsonPropertyName("processing")] IReadOnlyList<ProcessingStepSummary> Processing,
    [property: JsonPropertyName("reference_ppm_shift")] double ReferencePpmShift)
{
    private static readonly JsonSerializerOptions Indented = new() { WriteIndented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping };
    private static readonly JsonSerializerOptions Compact = new() { WriteIndented = false, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping };

    public static TraceSummary From(SpectrumTrace trace)
    {
        ArgumentNullException.ThrowIfNull(trace);
        var mhz = trace.ObserveMHz;
        return new TraceSummary(
            trace.Origin.Format, trace.Origin.Form, trace.Count,
            trace.ShiftPpm[0], trace.ShiftPpm[^1],
            mhz is null ? null : trace.FrequencyAt(0).Value,
            mhz is null ? null : trace.FrequencyAt(trace.Count - 1).Value,
            mhz, trace.Nucleus,
            trace.Intensity.Min(), trace.Intensity.Max(),
            trace.Origin.Warnings.ToArray(),
            trace.Origin.Processing?.Kind ?? ProcessingRecord.SpectrumKind,
            ProcessingStepSummary.From(trace.Origin.Processing),
            trace.Origin.Processing?.ReferencePpmShift ?? 0);
    }

    public string ToJson(bool indented = true) => JsonSerializer.Serialize(this, indented ? Indented : Compact);

    /// <summary>One "key: value" line per field, keys as in the JSON.</summary>
    public string ToText()
    {
        var c = CultureInfo.InvariantCulture;
        var sb = new StringBuilder();
        sb.AppendLine($"format: {Format}");
        sb.AppendLine($"form: {Form}");
        sb.AppendLine(c, $"points: {Points}");
        sb.AppendLine(c, $"ppm_first: {PpmFirst:0.######}");
        sb.AppendLine(c, $"ppm_last: {PpmLast:0.######}");
        sb.AppendLine(c, $"hz_first: {(HzFirst is { } hf ? hf.ToString("0.####", c) : "unknown")}");
        sb.AppendLine(c, $"hz_last: {(HzLast is { } hl ? hl.ToString("0.####", c) : "unknown")}");
        sb.AppendLine(c, $"observe_mhz: {(ObserveMHz is { } m ? m.ToString("0.######", c) : "unknown")}");
        sb.AppendLine($"nucleus: {Nucleus}");
        sb.AppendLine(c, $"y_min: {YMin:G6}");
        sb.AppendLine(c, $"y_max: {YMax:G6}");
        sb.AppendLine($"kind: {Kind}");
        if (Processing.Count > 0)
        {
            sb.AppendLine(c, $"processing: {Processing.Count} steps");
            foreach (var step in Processing) sb.AppendLine($"  - {step.Text}");
        }
        sb.AppendLine(c, $"reference_ppm_shift: {ReferencePpmShift:0.######}");
        sb.AppendLine(c, $"warnings: {Warnings.Count}");
        foreach (var w in Warnings) sb.AppendLine($"  - {w}");
        return sb.ToString();
    }
}

/// <summary>One processing step for JSON: its name, how its values were chosen, and the values by name (phases in degrees).</summary>
public sealed record ProcessingStepSummary(
    [property: JsonPropertyName("step")] string Step,
    [property: JsonPropertyName("how")] string How,
    [property: JsonPropertyName("values")] IReadOnlyDictionary<string, double> Values)
{
    [JsonIgnore]
    public string Text { get; init; } = "";

    public static IReadOnlyList<ProcessingStepSummary> From(ProcessingRecord? record) =>
        record is null
            ? []
            : record.Steps.Select(s => new ProcessingStepSummary(s.Name, s.How, s.Values.ToDictionary(v => v.Name, v => v.Value)) { Text = s.ToString() }).ToArray();
}
