using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Nodes;
using SpinSim.Core.Fitting.Spectral;

namespace SpinSim.Formats.Fitting;

/// <summary>
/// The fit report as JSON: <c>converged</c>, <c>rms</c>, <c>parameters</c> (each with <c>name</c>, <c>kind</c>, <c>nuclei</c>,
/// <c>value</c>, <c>std_error</c>, <c>unit</c>, <c>varied</c>, <c>tied_with</c>, <c>at_bound</c>), the correlation matrix,
/// statistics, the data line for a paper (<c>report_line</c>), warnings and the inputs with their SHA-256.
/// </summary>
public static class FitReportJson
{
    /// <param name="reportLine">The data line for a paper (<c>report_line</c>; SpinSim.Core.Reporting.NmrDataLine), or null.</param>
    public static string Write(SpectrumFitResult result, IEnumerable<(string Name, string Sha256)> inputs, string version, DateTimeOffset created,
        string? reportLine = null)
    {
        var root = new JsonObject
        {
            ["converged"] = result.Converged,
            ["stopped_by_user"] = result.Stopped,
            ["stop_reason"] = result.StopReason,
            ["rms"] = result.Rms,
            ["rms_unit"] = "fraction of the tallest measured point in the fitted regions",
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
            ["parameters"] = new JsonArray(result.Parameters.Select((p, i) => (JsonNode)new JsonObject
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
            }).ToArray()),
            ["correlation"] = new JsonObject
            {
                ["names"] = new JsonArray(result.FreeNames.Select(n => (JsonNode)JsonValue.Create(n)!).ToArray()),
                ["matrix"] = new JsonArray(Enumerable.Range(0, result.FreeNames.Count).Select(i => (JsonNode)new JsonArray(
                    Enumerable.Range(0, result.FreeNames.Count).Select(j => (JsonNode?)(double.IsFinite(result.Correlation[i, j]) ? JsonValue.Create(result.Correlation[i, j]) : null)).ToArray())).ToArray()),
            },
            ["report_line"] = reportLine,
            ["warnings"] = new JsonArray(result.Warnings.Select(w => (JsonNode)JsonValue.Create(w)!).ToArray()),
            ["note"] = "standard errors are s^2 (J^T J)^-1 with s^2 = RSS / (n - p); neighbouring points of a digitised spectrum are not independent, so they are optimistic",
            ["inputs"] = new JsonArray(inputs.Select(i => (JsonNode)new JsonObject { ["file"] = i.Name, ["sha256"] = i.Sha256 }).ToArray()),
            ["version"] = version,
            ["created"] = created.ToString("O"),
        };
        return root.ToJsonString(new JsonSerializerOptions { WriteIndented = true, Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
    }

    public static string Kind(ParameterKind kind) => kind switch
    {
        ParameterKind.ShiftPpm => "shift_ppm",
        ParameterKind.JHz => "j_hz",
        ParameterKind.LinewidthHz => "linewidth_hz",
        ParameterKind.Scale => "scale",
        ParameterKind.Baseline => "baseline",
        ParameterKind.OffsetHz => "offset_hz",
        ParameterKind.PhaseDeg => "phase_deg",
        _ => kind.ToString(),
    };
}
