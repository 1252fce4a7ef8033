using System.Text.Json;
using System.Text.Json.Nodes;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Formats.SpinSystems;

/// <summary>
/// The machine-readable form of a spin system for other programs:
/// {"field_mhz": 400.0, "nuclei": [{"id": "H1", "shift_ppm": 7.1, "count": 1, "isotope": "1H"}],
///  "couplings": [{"a": "H1", "b": "H2", "j_hz": 8.5}]}, optionally "title", "linewidth_hz", per-nucleus "linewidth_hz".
/// </summary>
public static class SpinSystemJson
{
    public static string Write(SpinSystem system, WidthHz? defaultWidth = null)
    {
        var root = new JsonObject
        {
            ["title"] = system.Title,
            ["field_mhz"] = system.Field.Value,
            ["observe"] = system.Observed.Symbol,
        };
        if (defaultWidth is { } w) root["linewidth_hz"] = w.Value;
        var nuclei = new JsonArray();
        foreach (var n in system.Nuclei)
        {
            var o = new JsonObject { ["id"] = n.Id, ["shift_ppm"] = n.Shift.Value, ["count"] = n.Count, ["isotope"] = n.Isotope.Symbol };
            if (n.Width is { } nw) o["linewidth_hz"] = nw.Value;
            nuclei.Add(o);
        }
        root["nuclei"] = nuclei;
        root["couplings"] = new JsonArray(system.Couplings
            .Select(c => (JsonNode)new JsonObject { ["a"] = c.A, ["b"] = c.B, ["j_hz"] = c.J.Value }).ToArray());
        return root.ToJsonString(new JsonSerializerOptions { WriteIndented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping });
    }

    public static SpinSystemDocument Read(string path)
    {
        return Parse(SpinSystemFiles.ReadText(path), path);
    }

    public static SpinSystemDocument Parse(string text, string path)
    {
        if (string.IsNullOrWhiteSpace(text))
            throw new SpinSystemFileException(path, null, "the file is empty", "Write {\"field_mhz\": 400, \"nuclei\": [...], \"couplings\": [...]}");
        var lines = JsonLineMap.Scan(text, path);
        // The scan has refused invalid JSON and duplicate keys, the two things that make the parser throw.
        var root = JsonNode.Parse(text, documentOptions: new JsonDocumentOptions { CommentHandling = JsonCommentHandling.Skip, AllowTrailingCommas = true });
        var read = new Reader(path, lines);
        if (root is not JsonObject obj)
            throw new SpinSystemFileException(path, lines.LineOf(""), "the JSON is not an object", "Write {\"field_mhz\": 400, \"nuclei\": [...], \"couplings\": [...]}");

        read.Keys(obj, "", ["title", "field_mhz", "observe", "linewidth_hz", "nuclei", "couplings"]);
        var field = read.Number(obj, "", "field_mhz") ?? throw read.Missing("", "field_mhz", "\"field_mhz\": 400");
        var title = read.Text(obj, "", "title") ?? "";
        var observed = read.Text(obj, "", "observe") is { } ob ? read.IsotopeOf("observe", ob) : Isotope.H1;
        WidthHz? width = read.Number(obj, "", "linewidth_hz") is { } w ? new WidthHz(w) : null;

        var nuclei = new List<Nucleus>();
        if (obj["nuclei"] is not JsonArray na || na.Count == 0)
            throw obj["nuclei"] is null
                ? read.Missing("", "nuclei", "\"nuclei\": [{\"id\": \"H1\", \"shift_ppm\": 7.1}]")
                : new SpinSystemFileException(path, lines.LineOf("nuclei"), "nuclei must be a list of one or more nuclei", "Write \"nuclei\": [{\"id\": \"H1\", \"shift_ppm\": 7.1}]");
        for (var i = 0; i < na.Count; i++)
        {
            var where = $"nuclei[{i}]";
            if (na[i] is not JsonObject n) throw new SpinSystemFileException(path, lines.LineOf(where), $"{where} is not an object", "Write {\"id\": \"H1\", \"shift_ppm\": 7.1}");
            read.Keys(n, where, ["id", "shift_ppm", "count", "isotope", "linewidth_hz"]);
            var id = read.Text(n, where, "id") ?? throw read.Missing(where, "id", "\"id\": \"H1\"");
            var shift = read.Number(n, where, "shift_ppm") ?? throw read.Missing(where, "shift_ppm", "\"shift_ppm\": 7.1");
            var count = read.Number(n, where, "count") ?? 1;
            if (count != Math.Floor(count))
                throw new SpinSystemFileException(path, lines.LineOf($"{where}.count"), $"{where}.count must be a whole number", "Write \"count\": 3");
            var iso = read.Text(n, where, "isotope") is { } isoText ? read.IsotopeOf($"{where}.isotope", isoText) : Isotope.H1;
            WidthHz? nw = read.Number(n, where, "linewidth_hz") is { } x ? new WidthHz(x) : null;
            nuclei.Add(new Nucleus(id, new ShiftPpm(shift), (int)Math.Clamp(count, int.MinValue, int.MaxValue), iso, nw));
        }
        var couplings = new List<Coupling>();
        if (obj["couplings"] is { } cn && cn is not JsonArray)
            throw new SpinSystemFileException(path, lines.LineOf("couplings"), "couplings must be a list", "Write \"couplings\": [{\"a\": \"H1\", \"b\": \"H2\", \"j_hz\": 8.5}]");
        if (obj["couplings"] is JsonArray ca)
            for (var i = 0; i < ca.Count; i++)
            {
                var where = $"couplings[{i}]";
                if (ca[i] is not JsonObject c) throw new SpinSystemFileException(path, lines.LineOf(where), $"{where} is not an object", "Write {\"a\": \"H1\", \"b\": \"H2\", \"j_hz\": 8.5}");
                read.Keys(c, where, ["a", "b", "j_hz"]);
                var a = read.Text(c, where, "a") ?? throw read.Missing(where, "a", "\"a\": \"H1\"");
                var b = read.Text(c, where, "b") ?? throw read.Missing(where, "b", "\"b\": \"H2\"");
                var j = read.Number(c, where, "j_hz") ?? throw read.Missing(where, "j_hz", "\"j_hz\": 8.5");
                couplings.Add(new Coupling(a, b, new CouplingHz(j)));
            }

        var sites = new SourceLines(lines.LineOf("field_mhz"),
            Enumerable.Range(0, nuclei.Count).Select(i => lines.LineOf($"nuclei[{i}]")).ToArray(),
            Enumerable.Range(0, couplings.Count).Select(i => lines.LineOf($"couplings[{i}]")).ToArray(),
            lines.LineOf("linewidth_hz"));
        return SpinSystemDocument.Build(path, new FieldMHz(field), nuclei, couplings, title, observed, width, sites);
    }

    /// <summary>Typed access to the values of one file, every refusal naming the path in the document and its line.</summary>
    private sealed class Reader(string path, JsonLineMap lines)
    {
        private static string At(string where, string key) => where.Length == 0 ? key : $"{where}.{key}";

        private static string Shown(string where) => where.Length == 0 ? "the top level" : where;

        public void Keys(JsonObject o, string where, string[] allowed)
        {
            foreach (var (key, _) in o)
                if (!allowed.Contains(key))
                    throw new SpinSystemFileException(path, lines.LineOf(At(where, key)), $"unknown key \"{key}\" in {Shown(where)}",
                        $"Did you mean \"{SpinSystemToml.KeyHint(key, allowed)}\"? Allowed keys: {string.Join(", ", allowed)}");
        }

        public double? Number(JsonObject o, string where, string key)
        {
            if (!o.TryGetPropertyValue(key, out var node)) return null;
            if (node is JsonValue v && v.GetValueKind() == JsonValueKind.Number && v.TryGetValue<double>(out var d) && double.IsFinite(d)) return d;
            throw new SpinSystemFileException(path, lines.LineOf(At(where, key)), $"{At(where, key)} must be a finite number",
                $"Write \"{key}\": 1.5 (no quotes)");
        }

        public string? Text(JsonObject o, string where, string key)
        {
            if (!o.TryGetPropertyValue(key, out var node)) return null;
            if (node is JsonValue v && v.GetValueKind() == JsonValueKind.String) return v.GetValue<string>();
            throw new SpinSystemFileException(path, lines.LineOf(At(where, key)), $"{At(where, key)} must be a text in double quotes",
                $"Write \"{key}\": \"...\"");
        }

        public Isotope IsotopeOf(string at, string text) => Isotope.TryParse(text, out var iso) ? iso
            : throw new SpinSystemFileException(path, lines.LineOf(at), $"unknown isotope \"{text}\"", $"Use one of {string.Join(", ", Isotope.Known.Select(i => i.Symbol))}");

        public SpinSystemFileException Missing(string where, string key, string example) =>
            new(path, lines.LineOf(where), $"{key} is missing in {Shown(where)}", $"Add {example}");
    }
}
