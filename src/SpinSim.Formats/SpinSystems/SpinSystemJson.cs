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
        JsonNode? root;
        try { root = JsonNode.Parse(text, documentOptions: new JsonDocumentOptions { CommentHandling = JsonCommentHandling.Skip, AllowTrailingCommas = true }); }
        catch (JsonException e)
        {
            throw new SpinSystemFileException(path, (int?)e.LineNumber + 1, $"not valid JSON: {e.Message}", "Fix the JSON syntax at that line");
        }
        if (root is not JsonObject obj)
            throw new SpinSystemFileException(path, null, "the JSON is not an object", "Write {\"field_mhz\": 400, \"nuclei\": [...], \"couplings\": [...]}");

        Check(path, obj, "the top level", ["title", "field_mhz", "observe", "linewidth_hz", "nuclei", "couplings"]);
        var field = Number(path, obj, "field_mhz", "the top level") ?? throw Missing(path, "field_mhz", "the top level", "\"field_mhz\": 400");
        var title = obj["title"]?.GetValue<string>() ?? "";
        var observed = obj["observe"] is { } ob ? IsotopeOf(path, ob.GetValue<string>()) : Isotope.H1;
        WidthHz? width = Number(path, obj, "linewidth_hz", "the top level") is { } w ? new WidthHz(w) : null;

        var nuclei = new List<Nucleus>();
        if (obj["nuclei"] is not JsonArray na || na.Count == 0)
            throw Missing(path, "nuclei", "the top level", "\"nuclei\": [{\"id\": \"H1\", \"shift_ppm\": 7.1}]");
        for (var i = 0; i < na.Count; i++)
        {
            var where = $"nuclei[{i}]";
            if (na[i] is not JsonObject n) throw new SpinSystemFileException(path, null, $"{where} is not an object", "Write {\"id\": \"H1\", \"shift_ppm\": 7.1}");
            Check(path, n, where, ["id", "shift_ppm", "count", "isotope", "linewidth_hz"]);
            var id = n["id"]?.GetValue<string>() ?? throw Missing(path, "id", where, "\"id\": \"H1\"");
            var shift = Number(path, n, "shift_ppm", where) ?? throw Missing(path, "shift_ppm", where, "\"shift_ppm\": 7.1");
            var count = Number(path, n, "count", where) ?? 1;
            if (count != Math.Floor(count)) throw new SpinSystemFileException(path, null, $"{where}.count must be a whole number", "Write \"count\": 3");
            var iso = n["isotope"] is { } isoNode ? IsotopeOf(path, isoNode.GetValue<string>()) : Isotope.H1;
            WidthHz? nw = Number(path, n, "linewidth_hz", where) is { } x ? new WidthHz(x) : null;
            nuclei.Add(new Nucleus(id, new ShiftPpm(shift), (int)Math.Clamp(count, int.MinValue, int.MaxValue), iso, nw));
        }
        var couplings = new List<Coupling>();
        if (obj["couplings"] is JsonArray ca)
            for (var i = 0; i < ca.Count; i++)
            {
                var where = $"couplings[{i}]";
                if (ca[i] is not JsonObject c) throw new SpinSystemFileException(path, null, $"{where} is not an object", "Write {\"a\": \"H1\", \"b\": \"H2\", \"j_hz\": 8.5}");
                Check(path, c, where, ["a", "b", "j_hz"]);
                var a = c["a"]?.GetValue<string>() ?? throw Missing(path, "a", where, "\"a\": \"H1\"");
                var b = c["b"]?.GetValue<string>() ?? throw Missing(path, "b", where, "\"b\": \"H2\"");
                var j = Number(path, c, "j_hz", where) ?? throw Missing(path, "j_hz", where, "\"j_hz\": 8.5");
                couplings.Add(new Coupling(a, b, new CouplingHz(j)));
            }

        var problems = SpinSystemRules.Check(new FieldMHz(field), nuclei, couplings);
        if (problems.Count > 0)
        {
            var p = problems[0];
            var where = p.Site switch { ProblemSite.Field => "field_mhz", ProblemSite.Nucleus => $"nuclei[{p.Index}]", _ => $"couplings[{p.Index}]" };
            throw new SpinSystemFileException(path, null, $"{where}: {p.Message}", p.Fix);
        }
        if (width is { } dw && dw.Value <= 0)
            throw new SpinSystemFileException(path, null, "linewidth_hz must be above 0", "Give the FWHM in Hz, for example 0.8");
        var system = SpinSystem.Create(new FieldMHz(field), nuclei, couplings, title, observed);
        return new SpinSystemDocument(path, system, width, SpinSystemRules.Warnings(system));
    }

    private static void Check(string path, JsonObject o, string where, string[] allowed)
    {
        foreach (var (key, _) in o)
            if (!allowed.Contains(key))
                throw new SpinSystemFileException(path, null, $"unknown key \"{key}\" in {where}", $"Allowed keys: {string.Join(", ", allowed)}");
    }

    private static double? Number(string path, JsonObject o, string key, string where)
    {
        if (o[key] is not { } node) return null;
        if (node is JsonValue v && v.TryGetValue<double>(out var d))
        {
            if (!double.IsFinite(d)) throw new SpinSystemFileException(path, null, $"{where}.{key} is not finite", "Give an ordinary number");
            return d;
        }
        throw new SpinSystemFileException(path, null, $"{where}.{key} must be a number", $"Write \"{key}\": 1.5 (no quotes)");
    }

    private static Isotope IsotopeOf(string path, string text) => Isotope.TryParse(text, out var iso) ? iso
        : throw new SpinSystemFileException(path, null, $"unknown isotope \"{text}\"", $"Use one of {string.Join(", ", Isotope.Known.Select(i => i.Symbol))}");

    private static SpinSystemFileException Missing(string path, string key, string where, string example) =>
        new(path, null, $"{key} is missing in {where}", $"Add {example}");
}
