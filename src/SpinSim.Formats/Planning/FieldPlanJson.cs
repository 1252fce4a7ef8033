using System.Text.Json;
using System.Text.Json.Nodes;
using SpinSim.Core.Planning;

namespace SpinSim.Formats.Planning;

/// <summary>
/// The machine-readable form of a field plan: a list with one entry per field, in increasing field,
/// <code>
/// [{"field_mhz": 80, "clusters": [{"cluster": 1, "nuclei": ["HA", "HB"], "min_ratio": 2.4, "closest_pair": ["HA", "HB"],
///    "first_order_deviation": 1.07, "resolved_lines": 12,
///    "lowest_first_order_field": {"reach": "bracketed", "tolerance": 0.05, "within_field_mhz": 512.3, "within_deviation": 0.0498,
///        "outside_field_mhz": 509.8, "outside_deviation": 0.0502, "high_field_limit_deviation": null}}]}]
/// </code>
/// The top level stays a list, so the per-cluster result of the lowest-field search, which belongs to no single field,
/// is repeated in that cluster's entry at every field. "min_ratio" is the smallest |delta nu| / |J| over coupled pairs of
/// different shift (null when there is none); "reach" is one of "bracketed", "at_or_below_lowest_field",
/// "above_largest_field", "not_at_any_field"; fields and deviations the search did not find are null.
/// </summary>
public static class FieldPlanJson
{
    private static readonly JsonSerializerOptions Indented = new()
    {
        WriteIndented = true,
        Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };

    public static string Write(FieldPlan plan)
    {
        ArgumentNullException.ThrowIfNull(plan);
        var lowest = plan.LowestFields.ToDictionary(l => l.Cluster.Number);
        var list = new JsonArray();
        foreach (var point in plan.Fields)
        {
            var clusters = new JsonArray();
            foreach (var c in point.Clusters)
            {
                clusters.Add(new JsonObject
                {
                    ["cluster"] = c.Cluster.Number,
                    ["nuclei"] = new JsonArray(c.Cluster.Ids.Select(id => (JsonNode)JsonValue.Create(id)!).ToArray()),
                    ["min_ratio"] = c.MinDeltaNuOverJ,
                    ["closest_pair"] = c.ClosestPair is { } p ? new JsonArray(JsonValue.Create(p.A), JsonValue.Create(p.B)) : null,
                    ["first_order_deviation"] = c.FirstOrderDeviation,
                    ["resolved_lines"] = c.ResolvedLines,
                    ["lowest_first_order_field"] = Lowest(lowest[c.Cluster.Number], plan.Settings.Tolerance),
                });
            }
            list.Add(new JsonObject { ["field_mhz"] = point.Field.Value, ["clusters"] = clusters });
        }
        return list.ToJsonString(Indented);
    }

    private static JsonObject Lowest(LowestFirstOrderField l, double tolerance) => new()
    {
        ["reach"] = l.Reach switch
        {
            FirstOrderReach.Bracketed => "bracketed",
            FirstOrderReach.AtOrBelowLowestField => "at_or_below_lowest_field",
            FirstOrderReach.AboveLargestField => "above_largest_field",
            _ => "not_at_any_field",
        },
        ["tolerance"] = tolerance,
        ["within_field_mhz"] = l.Within?.Value,
        ["within_deviation"] = l.DeviationWithin,
        ["outside_field_mhz"] = l.Outside?.Value,
        ["outside_deviation"] = l.DeviationOutside,
        ["high_field_limit_deviation"] = l.HighFieldLimitDeviation,
    };
}
