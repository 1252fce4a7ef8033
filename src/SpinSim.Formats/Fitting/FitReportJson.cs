using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Nodes;
using SpinSim.Core.Fitting.Spectral;

namespace SpinSim.Formats.Fitting;

/// <summary>
/// The fit report as JSON: <c>converged</c>, <c>rms</c>, <c>parameters</c> (each with <c>name</c>, <c>kind</c>, <c>nuclei</c>,
/// <c>value</c>, <c>std_error</c>, <c>unit</c>, <c>varied</c>, <c>tied_with</c>, <c>at_bound</c>), the correlation matrix,
/// statistics, warnings, <c>data</c> (per trace: <c>source</c>, <c>kind</c> "spectrum" or "fid", the <c>processing</c> steps
/// with their values, phases in degrees, and <c>reference_ppm_shift</c>), the data line for a paper (<c>report_line</c>)
/// and the inputs with their SHA-256.
/// </summary>
public static class FitReportJson
{
    /// <summary>
    /// Version of this report's layout: 2 added <c>setup</c> (everything needed to rerun the fit), <c>rms_per_trace</c>,
    /// <c>start_rms</c>, <c>start_was_best</c> and <c>overlay</c>; 3 added <c>solutions</c> (what the sign search tried, the
    /// alternative solutions) and, per coupling, <c>relative_sign</c> with its misfit ratio.
    /// </summary>
    public const int SchemaVersion = 3;

    /// <summary>How one fitted trace was made from its file: kind, processing steps and values, re-referencing shift.</summary>
    public static JsonObject DataNode(SpinSim.Core.Traces.TraceOrigin origin) => new()
    {
        ["source"] = Path.GetFileName(origin.Source),
        ["kind"] = origin.Processing?.Kind ?? SpinSim.Core.Processing.ProcessingRecord.SpectrumKind,
        ["processing"] = new JsonArray((origin.Processing?.Steps ?? []).Select(step => (JsonNode)new JsonObject
        {
            ["step"] = step.Name,
            ["how"] = step.How,
            ["values"] = new JsonObject(step.Values.Select(v => KeyValuePair.Create(v.Name, (JsonNode?)JsonValue.Create(v.Value)))),
        }).ToArray()),
        ["reference_ppm_shift"] = origin.Processing?.ReferencePpmShift ?? 0,
    };

    /// <param name="reportLine">The data line for a paper (<c>report_line</c>; SpinSim.Core.Reporting.NmrDataLine), or null.</param>
    public static string Write(SpectrumFitResult result, IEnumerable<(string Name, string Sha256)> inputs, string version, DateTimeOffset created,
        string? reportLine = null)
    {
        var root = new JsonObject
        {
            ["schema_version"] = SchemaVersion,
            ["converged"] = result.Converged,
            ["stopped_by_user"] = result.Stopped,
            ["stop_reason"] = result.StopReason,
            ["rms"] = result.Rms,
            ["rms_unit"] = "fraction of the tallest measured point in the fitted regions",
            ["rms_per_trace"] = new JsonArray(result.RmsPerTrace.Select(r => (JsonNode)JsonValue.Create(r)).ToArray()),
            ["start_rms"] = result.StartRms,
            ["start_was_best"] = result.StartWasBest,
            ["overlay"] = result.Overlay,
            ["r_factor"] = result.RFactor,
            ["points"] = result.Points,
            ["iterations"] = result.Iterations,
            ["starts"] = result.Starts,
            ["starts_at_best"] = result.StartsAtBest,
            ["starts_joined"] = result.StartsJoined,
            ["bootstrap"] = result.Bootstrap is { } b ? new JsonObject
            {
                ["method"] = "moving-block residual bootstrap (Kunsch 1989), refitted from the best point",
                ["replicates"] = b.Replicates,
                ["converged"] = b.Converged,
                ["block_points"] = b.BlockPoints,
            } : null,
            ["parameters"] = new JsonArray(result.Parameters.Select((p, i) => (JsonNode)WithSign(new JsonObject
            {
                ["name"] = p.Name,
                ["kind"] = Kind(p.Kind),
                ["nuclei"] = new JsonArray(p.Nuclei.Select(n => (JsonNode)JsonValue.Create(n)!).ToArray()),
                ["trace"] = p.Dataset < 0 ? null : p.Dataset + 1,
                ["value"] = p.Value,
                ["std_error"] = double.IsFinite(p.StdError) ? p.StdError : null,
                ["bootstrap_std_error"] = result.Bootstrap is { } bs && double.IsFinite(bs.StdErrors[i]) ? bs.StdErrors[i] : null,
                ["unit"] = p.Unit,
                ["varied"] = p.Varied,
                ["tied_with"] = p.TiedWith,
                ["at_bound"] = p.AtBound,
            }, result, p.Name)).ToArray()),
            ["solutions"] = result.Solutions is { } sol ? new JsonObject
            {
                ["starts_tried"] = sol.StartsTried,
                ["sign_patterns_tried"] = sol.SignPatternsTried,
                ["abx_second_solutions_tried"] = sol.SecondSolutionsTried,
                ["distinct_optima"] = sol.DistinctOptima,
                ["effective_points"] = sol.EffectivePoints,
                ["test"] = "Hamilton's R-factor ratio test (Acta Cryst. 18, 502, 1965) at 5 %, on the effective number of independent points",
                ["alternatives"] = new JsonArray(sol.Alternatives.Select(a => (JsonNode)new JsonObject
                {
                    ["misfit_ratio"] = a.MisfitRatio,
                    ["probability"] = a.Probability,
                    ["reached_from"] = a.Origin,
                    ["differences"] = new JsonArray(a.Differences.Select(d => (JsonNode)new JsonObject
                    {
                        ["name"] = d.Name, ["unit"] = d.Unit, ["best"] = d.Best, ["alternative"] = d.Alternative,
                    }).ToArray()),
                }).ToArray()),
            } : null,
            ["correlation"] = new JsonObject
            {
                ["names"] = new JsonArray(result.FreeNames.Select(n => (JsonNode)JsonValue.Create(n)!).ToArray()),
                ["matrix"] = new JsonArray(Enumerable.Range(0, result.FreeNames.Count).Select(i => (JsonNode)new JsonArray(
                    Enumerable.Range(0, result.FreeNames.Count).Select(j => (JsonNode?)(double.IsFinite(result.Correlation[i, j]) ? JsonValue.Create(result.Correlation[i, j]) : null)).ToArray())).ToArray()),
            },
            ["report_line"] = reportLine,
            ["warnings"] = new JsonArray(result.Warnings.Select(w => (JsonNode)JsonValue.Create(w)!).ToArray()),
            ["note"] = "standard errors are s^2 (J^T J)^-1 with s^2 = RSS / (n - p); neighbouring points of a digitised spectrum are not independent, so they are optimistic",
            ["setup"] = result.Setup is { } setup ? Setup(setup) : null,
            ["data"] = new JsonArray(result.Traces.Select(t => (JsonNode)DataNode(t.Measured.Origin)).ToArray()),
            ["inputs"] = new JsonArray(inputs.Select(i => (JsonNode)new JsonObject { ["file"] = i.Name, ["sha256"] = i.Sha256 }).ToArray()),
            ["version"] = version,
            ["created"] = created.ToString("O"),
        };
        return root.ToJsonString(new JsonSerializerOptions { WriteIndented = true, Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
    }

    /// <summary>
    /// A coupling's relative sign as the search found it: <c>relative_sign</c> ("determined" or "undetermined"),
    /// <c>sign_relative_to</c>, <c>sign_misfit_ratio</c>, <c>sign_probability</c>, <c>sign_reason</c>. Nothing for other
    /// parameters or without a search.
    /// </summary>
    private static JsonObject WithSign(JsonObject o, SpectrumFitResult result, string name)
    {
        if (result.Solutions?.Signs.FirstOrDefault(v => v.Parameter == name) is not { } v) return o;
        o["relative_sign"] = v.Determined ? "determined" : "undetermined";
        o["sign_relative_to"] = new JsonArray(v.RelativeTo.Select(n => (JsonNode)JsonValue.Create(n)!).ToArray());
        o["sign_misfit_ratio"] = double.IsFinite(v.MisfitRatio) ? v.MisfitRatio : null;
        o["sign_probability"] = double.IsFinite(v.Probability) ? v.Probability : null;
        o["sign_reason"] = v.Reason;
        return o;
    }

    private static JsonObject Setup(FitSetupRecord s) => new()
    {
        ["traces"] = new JsonArray(s.Traces.Select(t => (JsonNode)new JsonObject
        {
            ["source"] = t.Source,
            ["format"] = t.Format,
            ["field_mhz"] = t.FieldMHz,
            ["regions_ppm"] = Ranges(t.Regions),
            ["regions_automatic"] = t.RegionsAutomatic,
            ["exclude_ppm"] = Ranges(t.Exclude),
            ["processing"] = Strings(t.Processing),
            ["phase_pivot_ppm"] = t.PhasePivotPpm,
        }).ToArray()),
        ["parameters"] = new JsonArray(s.Parameters.Select(p => (JsonNode)new JsonObject
        {
            ["name"] = p.Name,
            ["kind"] = Kind(p.Kind),
            ["start"] = p.Start,
            ["lower"] = double.IsFinite(p.Lower) ? p.Lower : null,
            ["upper"] = double.IsFinite(p.Upper) ? p.Upper : null,
            ["bounds_given"] = p.BoundsGiven,
            ["varied"] = p.Varied,
            ["held_because"] = p.HeldBecause,
            ["tied_with"] = p.TiedWith,
        }).ToArray()),
        ["ties"] = new JsonArray(s.Ties.Select(t => (JsonNode)Strings(t)).ToArray()),
        ["starts"] = s.Starts,
        ["seed"] = s.Seed,
        ["max_iterations"] = s.MaxIterations,
        ["lineshape"] = s.Lineshape,
        ["shift_window_ppm"] = s.ShiftWindowPpm,
        ["symmetries"] = Strings(s.Symmetries),
        ["symmetries_tied"] = s.SymmetriesTied,
        ["command_line"] = s.CommandLine,
        ["version"] = s.Version,
    };

    private static JsonArray Ranges(IEnumerable<PpmRange> ranges) =>
        new(ranges.Select(r => (JsonNode)new JsonArray(JsonValue.Create(r.High), JsonValue.Create(r.Low))).ToArray());

    private static JsonArray Strings(IEnumerable<string> items) => new(items.Select(i => (JsonNode)JsonValue.Create(i)!).ToArray());

    public static string Kind(ParameterKind kind) => ParameterKindInfo.Of(kind).Key;
}
