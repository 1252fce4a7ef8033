using System.Globalization;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace SpinSim.Figures.Report;

/// <summary>
/// A JSON record (the fit report's setup) as key/value rows for a page: nested objects become dotted keys
/// ("bounds.shift:HA"), arrays of numbers or strings one comma-separated value, arrays of arrays "[7.6, 6.8]; [3.1, 2.9]",
/// arrays of objects one key per element ("traces[2].field_mhz"). Generic, so new entries in the record show up as they are.
/// </summary>
public static class SetupTable
{
    public static IReadOnlyList<(string Key, string Value)> Flatten(JsonNode? node)
    {
        var rows = new List<(string, string)>();
        if (node is JsonObject obj) foreach (var (key, value) in obj) Add(rows, key, value);
        else if (node is not null) Add(rows, "setup", node);
        return rows;
    }

    private static void Add(List<(string, string)> rows, string key, JsonNode? node)
    {
        switch (node)
        {
            case null: rows.Add((key, "none")); break;
            case JsonObject obj:
                if (obj.Count == 0) rows.Add((key, "none"));
                foreach (var (k, v) in obj) Add(rows, $"{key}.{k}", v);
                break;
            case JsonArray array when array.All(e => e is JsonObject):
                if (array.Count == 0) rows.Add((key, "none"));
                for (var i = 0; i < array.Count; i++) Add(rows, $"{key}[{i + 1}]", array[i]);
                break;
            case JsonArray array:
                rows.Add((key, array.Count == 0 ? "none" : string.Join(array.All(e => e is JsonArray) ? "; " : ", ", array.Select(Inline))));
                break;
            default: rows.Add((key, Inline(node))); break;
        }
    }

    private static string Inline(JsonNode? node) => node switch
    {
        null => "null",
        JsonArray a => "[" + string.Join(", ", a.Select(Inline)) + "]",
        JsonValue v when v.TryGetValue<string>(out var s) => s,
        JsonValue v when v.TryGetValue<double>(out var d) => d.ToString("R", CultureInfo.InvariantCulture),
        _ => node.ToJsonString(new JsonSerializerOptions { Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping }),
    };
}
