using System.Globalization;
using System.Text;
using SpinSim.Core.Model;
using SpinSim.Core.Units;
using Tomlyn.Parsing;
using Tomlyn.Syntax;

namespace SpinSim.Formats.SpinSystems;

/// <summary>
/// Reads and writes SpinSim's own TOML schema for spin systems:
/// <code>
/// title = "..."                 # optional
/// field_mhz = 400               # or field_tesla = 9.4
/// linewidth_hz = 0.8            # optional default FWHM
/// [[nucleus]]                   # one entry per nucleus or set of equivalent nuclei
/// id = "Me"; shift_ppm = 1.2; count = 3; isotope = "1H"; linewidth_hz = 0.9
/// [[coupling]]
/// between = ["Me", "CH2"]; j_hz = 7.1
/// [[symmetry]]                  # optional: nuclei a symmetry of the molecule exchanges, in pairs
/// swap = [["HA", "HA'"], ["HB", "HB'"]]
/// </code>
/// Unknown keys are errors (a typo must not load as a silently different system).
/// </summary>
public static class SpinSystemToml
{
    private static readonly string[] TopKeys = ["title", "field_mhz", "field_tesla", "linewidth_hz", "observe"];
    private static readonly string[] NucleusKeys = ["id", "shift_ppm", "count", "isotope", "linewidth_hz"];
    private static readonly string[] CouplingKeys = ["between", "j_hz"];
    private static readonly string[] SymmetryKeys = ["swap"];

    public static SpinSystemDocument Read(string path)
    {
        return Parse(SpinSystemFiles.ReadText(path), path);
    }

    public static SpinSystemDocument Parse(string text, string path)
    {
        if (string.IsNullOrWhiteSpace(text))
            throw new SpinSystemFileException(path, null, "the file is empty", "Write at least field_mhz and one [[nucleus]] table; see spin-systems/ for examples");
        var doc = ParseSyntax(text, path);

        var fieldLine = 0;
        int? widthLine = null;
        double? fieldMHz = null;
        string title = "";
        WidthHz? defaultWidth = null;
        Isotope observed = Isotope.H1;
        foreach (var kv in doc.KeyValues)
        {
            var (key, line) = (KeyOf(kv.Key!), Line(kv));
            switch (key)
            {
                case "title": title = String(path, kv); break;
                case "field_mhz": fieldMHz = Number(path, kv); fieldLine = line; break;
                case "field_tesla":
                    var tesla = Number(path, kv);
                    fieldMHz = FieldMHz.FromTesla(tesla).Value; fieldLine = line;
                    break;
                case "linewidth_hz": defaultWidth = Width(path, kv); widthLine = line; break;
                case "observe": observed = IsotopeOf(path, kv); break;
                default: throw UnknownKey(path, line, key, TopKeys, "at the top of the file");
            }
        }
        if (doc.KeyValues.Any(kv => KeyOf(kv.Key!) == "field_mhz") && doc.KeyValues.Any(kv => KeyOf(kv.Key!) == "field_tesla"))
            throw new SpinSystemFileException(path, fieldLine, "both field_mhz and field_tesla are given", "Keep one of them");
        if (fieldMHz is null)
            throw new SpinSystemFileException(path, 1, "the spectrometer field is missing", "Add field_mhz = 400 (the 1H frequency in MHz) or field_tesla = 9.4 at the top of the file");

        var nuclei = new List<Nucleus>();
        var nucleusLines = new List<int>();
        var couplings = new List<Coupling>();
        var couplingLines = new List<int>();
        var fitEntries = new List<FitEntry>();
        var symmetries = new List<(MirrorSymmetry Symmetry, int Line)>();
        foreach (var table in doc.Tables)
        {
            var name = KeyOf(table.Name!);
            var line = table.Span.Start.Line + 1;
            var isArray = table is TableArraySyntax;
            if (name == "nucleus" && isArray) { nuclei.Add(ReadNucleus(path, table, line)); nucleusLines.Add(line); }
            else if (name == "coupling" && isArray) { couplings.Add(ReadCoupling(path, table, line)); couplingLines.Add(line); }
            else if (name == "symmetry" && isArray) symmetries.Add((ReadSymmetry(path, table, line), line));
            else if (name == "fit" || name.StartsWith("fit.", StringComparison.Ordinal))
                foreach (var kv in table.Items) fitEntries.Add(new FitEntry(name, KeyOf(kv.Key!), Value(path, kv.Value!, Line(kv)), Line(kv)));
            else if (name is "nucleus" or "coupling" or "symmetry")
                throw new SpinSystemFileException(path, line, $"[{name}] must be written [[{name}]] (one double-bracket table per {name})", $"Write [[{name}]]");
            else
                throw new SpinSystemFileException(path, line, $"unknown table [{name}]", "Use [[nucleus]], [[coupling]], [[symmetry]] or [fit]");
        }
        if (nuclei.Count == 0)
            throw new SpinSystemFileException(path, null, "no nuclei are defined", "Add at least one [[nucleus]] table with id and shift_ppm");

        var document = SpinSystemDocument.Build(path, new FieldMHz(fieldMHz.Value), nuclei, couplings, title, observed, defaultWidth,
            new SourceLines(fieldLine, nucleusLines.Select(l => (int?)l).ToArray(), couplingLines.Select(l => (int?)l).ToArray(), widthLine),
            fitEntries.Count > 0 ? new FitSection(path, fitEntries) : null);
        foreach (var (symmetry, line) in symmetries)
            if (symmetry.Problems(document.System) is { Count: > 0 } wrong)
                throw new SpinSystemFileException(path, line, $"this [[symmetry]] does not fit the system: {wrong[0]}",
                    "List in swap only pairs of nuclei that the molecule's symmetry exchanges, with every coupling's mirror coupling present");
        return document with { Symmetries = symmetries.Select(s => s.Symmetry).ToArray() };
    }

    /// <summary>Reads a fit file: a TOML file holding only a [fit] table (and [fit.bounds]), the same keys as in a system file.</summary>
    public static FitSection ReadFitFile(string path) => ParseFitFile(SpinSystemFiles.ReadText(path, "the fit file"), path);

    /// <summary>The [fit] section of a fit file's text; <paramref name="path"/> names it in messages.</summary>
    public static FitSection ParseFitFile(string text, string path)
    {
        var doc = ParseSyntax(text, path);
        if (doc.KeyValues.ChildrenCount > 0)
            throw new SpinSystemFileException(path, Line(doc.KeyValues.First()), "a fit file holds only a [fit] table", "Put the settings under a [fit] line");
        var entries = new List<FitEntry>();
        foreach (var table in doc.Tables)
        {
            var name = KeyOf(table.Name!);
            if (name != "fit" && !name.StartsWith("fit.", StringComparison.Ordinal))
                throw new SpinSystemFileException(path, table.Span.Start.Line + 1, $"unknown table [{name}] in a fit file", "Use [fit] and [fit.bounds]");
            foreach (var kv in table.Items) entries.Add(new FitEntry(name, KeyOf(kv.Key!), Value(path, kv.Value!, Line(kv)), Line(kv)));
        }
        return new FitSection(path, entries);
    }

    private static DocumentSyntax ParseSyntax(string text, string path)
    {
        var doc = SyntaxParser.Parse(text, path, true);
        if (!doc.HasErrors) return doc;
        var first = doc.Diagnostics.First(d => d.Kind == DiagnosticMessageKind.Error);
        throw new SpinSystemFileException(path, first.Span.Start.Line + 1, $"not valid TOML: {first.Message}",
            "Fix the syntax at that line (strings in double quotes, one key = value per line, tables as [[nucleus]] or [fit])");
    }

    private static Nucleus ReadNucleus(string path, TableSyntaxBase table, int tableLine)
    {
        string? id = null;
        double? shift = null;
        var count = 1;
        var isotope = Isotope.H1;
        WidthHz? width = null;
        foreach (var kv in table.Items)
        {
            var key = KeyOf(kv.Key!);
            switch (key)
            {
                case "id": id = String(path, kv); break;
                case "shift_ppm": shift = Number(path, kv); break;
                case "count":
                    if (kv.Value is not IntegerValueSyntax integer)
                        throw new SpinSystemFileException(path, Line(kv), "count must be a whole number", "Write count = 3 for a methyl");
                    // The limits themselves are SpinSystemRules'; this only keeps the value an int.
                    count = (int)Math.Clamp(integer.Value, int.MinValue, int.MaxValue);
                    break;
                case "isotope": isotope = IsotopeOf(path, kv); break;
                case "linewidth_hz": width = Width(path, kv); break;
                default: throw UnknownKey(path, Line(kv), key, NucleusKeys, "in [[nucleus]]");
            }
        }
        if (id is null) throw new SpinSystemFileException(path, tableLine, "this [[nucleus]] has no id", "Add id = \"H1\" (any short unique name)");
        if (shift is null) throw new SpinSystemFileException(path, tableLine, $"nucleus \"{id}\" has no shift_ppm", "Add shift_ppm = 7.26 (the chemical shift in ppm)");
        return new Nucleus(id, new ShiftPpm(shift.Value), count, isotope, width);
    }

    private static Coupling ReadCoupling(string path, TableSyntaxBase table, int tableLine)
    {
        string[]? between = null;
        double? j = null;
        foreach (var kv in table.Items)
        {
            var key = KeyOf(kv.Key!);
            switch (key)
            {
                case "between":
                    if (kv.Value is not ArraySyntax array || array.Items.ChildrenCount != 2 ||
                        array.Items.Any(i => i.Value is not StringValueSyntax))
                        throw new SpinSystemFileException(path, Line(kv), "between must list exactly two nucleus ids",
                            "Write between = [\"H1\", \"H2\"]");
                    between = array.Items.Select(i => ((StringValueSyntax)i.Value!).Value!).ToArray();
                    break;
                case "j_hz": j = Number(path, kv); break;
                default: throw UnknownKey(path, Line(kv), key, CouplingKeys, "in [[coupling]]");
            }
        }
        if (between is null) throw new SpinSystemFileException(path, tableLine, "this [[coupling]] does not say which nuclei it joins", "Add between = [\"H1\", \"H2\"]");
        if (j is null) throw new SpinSystemFileException(path, tableLine, $"coupling {between[0]}-{between[1]} has no j_hz", "Add j_hz = 7.5 (signed, in Hz)");
        return new Coupling(between[0], between[1], new CouplingHz(j.Value));
    }

    private static MirrorSymmetry ReadSymmetry(string path, TableSyntaxBase table, int tableLine)
    {
        MirrorSymmetry? symmetry = null;
        foreach (var kv in table.Items)
        {
            var key = KeyOf(kv.Key!);
            if (key != "swap") throw UnknownKey(path, Line(kv), key, SymmetryKeys, "in [[symmetry]]");
            if (kv.Value is not ArraySyntax pairs || pairs.Items.ChildrenCount == 0 || pairs.Items.Any(p =>
                    p.Value is not ArraySyntax pair || pair.Items.ChildrenCount != 2 || pair.Items.Any(i => i.Value is not StringValueSyntax)))
                throw new SpinSystemFileException(path, Line(kv), "swap must be a list of pairs of nucleus ids",
                    "Write swap = [[\"HA\", \"HA'\"], [\"HB\", \"HB'\"]] (each pair exchanged by the same symmetry)");
            symmetry = new MirrorSymmetry(pairs.Items.Select(p => ((ArraySyntax)p.Value!).Items.Select(i => ((StringValueSyntax)i.Value!).Value!).ToArray())
                .Select(p => (p[0], p[1])).ToArray());
        }
        return symmetry ?? throw new SpinSystemFileException(path, tableLine, "this [[symmetry]] lists no pairs", "Add swap = [[\"HA\", \"HA'\"], [\"HB\", \"HB'\"]]");
    }

    private static int Line(SyntaxNodeBase node) => node.Span.Start.Line + 1;

    private static string KeyOf(KeySyntax key)
    {
        var parts = new List<string> { Simple(key.Key!) };
        foreach (var dot in key.DotKeys) parts.Add(Simple(dot.Key!));
        return string.Join('.', parts);

        static string Simple(BareKeyOrStringValueSyntax k) => k switch
        {
            BareKeySyntax bare => bare.Key!.Text ?? "",
            StringValueSyntax s => s.Value ?? "",
            _ => k.ToString()!,
        };
    }

    private static double Number(string path, KeyValueSyntax kv)
    {
        double value = kv.Value switch
        {
            FloatValueSyntax f => f.Value,
            IntegerValueSyntax i => i.Value,
            _ => throw new SpinSystemFileException(path, Line(kv), $"{KeyOf(kv.Key!)} must be a number", $"Write {KeyOf(kv.Key!)} = 1.5 (no quotes)"),
        };
        if (!double.IsFinite(value))
            throw new SpinSystemFileException(path, Line(kv), $"{KeyOf(kv.Key!)} is {value}, not a finite number", "Give an ordinary number; inf and nan are not allowed");
        return value;
    }

    private static WidthHz Width(string path, KeyValueSyntax kv)
    {
        var w = Number(path, kv);
        if (w <= 0) throw new SpinSystemFileException(path, Line(kv), $"linewidth_hz is {w}, must be above 0", "Give the full width at half maximum in Hz, for example 0.8");
        return new WidthHz(w);
    }

    private static string String(string path, KeyValueSyntax kv) => kv.Value is StringValueSyntax s
        ? s.Value ?? ""
        : throw new SpinSystemFileException(path, Line(kv), $"{KeyOf(kv.Key!)} must be a text in double quotes", $"Write {KeyOf(kv.Key!)} = \"...\"");

    private static Isotope IsotopeOf(string path, KeyValueSyntax kv)
    {
        var text = String(path, kv);
        return Isotope.TryParse(text, out var iso) ? iso
            : throw new SpinSystemFileException(path, Line(kv), $"unknown isotope \"{text}\"",
                $"Use one of {string.Join(", ", Isotope.Known.Select(i => i.Symbol))}");
    }

    private static object Value(string path, ValueSyntax value, int line) => value switch
    {
        FloatValueSyntax f => f.Value,
        IntegerValueSyntax i => (double)i.Value,
        StringValueSyntax s => s.Value ?? "",
        BooleanValueSyntax b => b.Value,
        ArraySyntax a => a.Items.Select(i => Value(path, i.Value!, line)).ToArray(),
        _ => throw new SpinSystemFileException(path, line, "unsupported value in [fit]", "Use numbers, strings, true/false or arrays of them"),
    };

    private static SpinSystemFileException UnknownKey(string path, int line, string key, string[] allowed, string where)
    {
        var hint = KeyHint(key, allowed);
        return new SpinSystemFileException(path, line, $"unknown key \"{key}\" {where}",
            $"Did you mean \"{hint}\"? Allowed keys: {string.Join(", ", allowed)}");
    }

    /// <summary>
    /// The allowed key the user most likely meant: one that begins with what was typed (units are in the key names, so
    /// "shift" means "shift_ppm"), else one that contains it, else the nearest by edit distance.
    /// </summary>
    internal static string KeyHint(string key, IReadOnlyList<string> allowed)
    {
        var lower = key.ToLowerInvariant();
        return allowed.FirstOrDefault(a => lower.Length > 0 && a.StartsWith(lower, StringComparison.Ordinal))
            ?? allowed.FirstOrDefault(a => lower.Length > 1 && a.Contains(lower, StringComparison.Ordinal))
            ?? allowed.FirstOrDefault(a => a.Length > 1 && lower.StartsWith(a, StringComparison.Ordinal))
            ?? allowed.OrderBy(a => Distance(a, lower)).First();
    }

    private static int Distance(string a, string b)
    {
        var d = new int[a.Length + 1, b.Length + 1];
        for (var i = 0; i <= a.Length; i++) d[i, 0] = i;
        for (var j = 0; j <= b.Length; j++) d[0, j] = j;
        for (var i = 1; i <= a.Length; i++)
            for (var j = 1; j <= b.Length; j++)
                d[i, j] = Math.Min(Math.Min(d[i - 1, j] + 1, d[i, j - 1] + 1), d[i - 1, j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1));
        return d[a.Length, b.Length];
    }

    /// <summary>Writes a system in the same schema; the output reads back to an equal system.</summary>
    public static string Write(SpinSystem system, WidthHz? defaultWidth = null, IEnumerable<string>? headerComments = null,
        IEnumerable<MirrorSymmetry>? symmetries = null)
    {
        var inv = CultureInfo.InvariantCulture;
        var sb = new StringBuilder();
        foreach (var c in headerComments ?? []) sb.Append("# ").AppendLine(c);
        if (!string.IsNullOrEmpty(system.Title)) sb.Append("title = ").AppendLine(Quote(system.Title));
        sb.Append("field_mhz = ").AppendLine(system.Field.Value.ToString("R", inv));
        if (system.Observed != Isotope.H1) sb.Append("observe = ").AppendLine(Quote(system.Observed.Symbol));
        if (defaultWidth is { } w) sb.Append("linewidth_hz = ").AppendLine(w.Value.ToString("R", inv));
        foreach (var n in system.Nuclei)
        {
            sb.AppendLine().AppendLine("[[nucleus]]");
            sb.Append("id = ").AppendLine(Quote(n.Id));
            sb.Append("shift_ppm = ").AppendLine(n.Shift.Value.ToString("R", inv));
            if (n.Count != 1) sb.Append("count = ").AppendLine(n.Count.ToString(inv));
            if (n.Isotope != Isotope.H1) sb.Append("isotope = ").AppendLine(Quote(n.Isotope.Symbol));
            if (n.Width is { } nw) sb.Append("linewidth_hz = ").AppendLine(nw.Value.ToString("R", inv));
        }
        foreach (var c in system.Couplings)
        {
            sb.AppendLine().AppendLine("[[coupling]]");
            sb.Append("between = [").Append(Quote(c.A)).Append(", ").Append(Quote(c.B)).AppendLine("]");
            sb.Append("j_hz = ").AppendLine(c.J.Value.ToString("R", inv));
        }
        foreach (var symmetry in symmetries ?? [])
        {
            sb.AppendLine().AppendLine("[[symmetry]]");
            sb.Append("swap = [").Append(string.Join(", ", symmetry.Pairs.Select(p => $"[{Quote(p.A)}, {Quote(p.B)}]"))).AppendLine("]");
        }
        return sb.ToString();
    }

    private static string Quote(string s) => "\"" + s.Replace("\\", "\\\\").Replace("\"", "\\\"") + "\"";
}
