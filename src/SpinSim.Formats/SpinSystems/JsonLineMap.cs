using System.Text;
using System.Text.Json;

namespace SpinSim.Formats.SpinSystems;

/// <summary>
/// The 1-based line of every member and element of a JSON document, by path ("nuclei[2].shift_ppm"), found in one pass
/// of <see cref="Utf8JsonReader"/> before the document is interpreted. The pass also refuses what the interpretation
/// must never meet: invalid JSON and a key given twice in one object.
/// </summary>
internal sealed class JsonLineMap
{
    private readonly Dictionary<string, int> _lines = new(StringComparer.Ordinal);

    public static readonly JsonReaderOptions Options = new() { CommentHandling = JsonCommentHandling.Skip, AllowTrailingCommas = true };

    /// <exception cref="SpinSystemFileException">Invalid JSON, or a duplicate key, with its line.</exception>
    public static JsonLineMap Scan(string text, string path)
    {
        var bytes = Encoding.UTF8.GetBytes(text);
        var newlines = new List<long>();
        for (var i = 0; i < bytes.Length; i++) if (bytes[i] == (byte)'\n') newlines.Add(i);
        int LineAt(long offset)
        {
            var k = newlines.BinarySearch(offset);
            return (k < 0 ? ~k : k) + 1;
        }

        var map = new JsonLineMap();
        var reader = new Utf8JsonReader(bytes, Options);
        // Per open container: its path, whether it is an array, the next element index and the keys seen.
        var stack = new Stack<(string Path, bool Array, int Next, HashSet<string> Keys)>();
        string? pending = null; // path of the value that follows a property name
        try
        {
            while (reader.Read())
            {
                var line = LineAt(reader.TokenStartIndex);
                if (reader.TokenType == JsonTokenType.PropertyName)
                {
                    var (parent, _, _, keys) = stack.Peek();
                    var name = reader.GetString()!;
                    if (!keys.Add(name))
                        throw new SpinSystemFileException(path, line, $"the key \"{name}\" is given twice in {(parent.Length == 0 ? "the top level" : parent)}",
                            "Keep one of them");
                    pending = parent.Length == 0 ? name : $"{parent}.{name}";
                    map._lines[pending] = line;
                    continue;
                }
                if (reader.TokenType is JsonTokenType.EndObject or JsonTokenType.EndArray)
                {
                    stack.Pop();
                    continue;
                }
                string here;
                if (pending is not null) (here, pending) = (pending, null);
                else if (stack.Count > 0 && stack.Peek().Array)
                {
                    var top = stack.Pop();
                    here = $"{top.Path}[{top.Next}]";
                    stack.Push(top with { Next = top.Next + 1 });
                    map._lines[here] = line;
                }
                else here = "";
                if (here.Length == 0) map._lines[here] = line;
                if (reader.TokenType == JsonTokenType.StartObject) stack.Push((here, false, 0, new HashSet<string>(StringComparer.Ordinal)));
                else if (reader.TokenType == JsonTokenType.StartArray) stack.Push((here, true, 0, []));
            }
        }
        catch (JsonException e)
        {
            throw new SpinSystemFileException(path, (int?)e.LineNumber + 1, $"not valid JSON: {e.Message}", "Fix the JSON syntax at that line");
        }
        return map;
    }

    /// <summary>The line of the value at <paramref name="jsonPath"/>, or null when the document has none there.</summary>
    public int? LineOf(string jsonPath) => _lines.TryGetValue(jsonPath, out var line) ? line : null;
}
