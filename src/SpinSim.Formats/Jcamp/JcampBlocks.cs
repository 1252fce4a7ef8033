// Labelled data records and blocks as defined in McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988), sections 3-4.
using System.Text;

namespace SpinSim.Formats.Jcamp;

/// <summary>
/// One labelled data record (LDR): "##LABEL= value" and the lines that follow it up to the next label.
/// <see cref="Label"/> is normalised for comparison; the body is kept as offsets into the text so that
/// a 50 MB data table is never copied.
/// </summary>
internal sealed record Ldr(string Label, string RawLabel, string Value, int Line, int BodyStart, int BodyEnd)
{
    /// <summary>Line number of the first body line.</summary>
    public int BodyFirstLine => Line + 1;

    /// <summary>
    /// The standard compares labels ignoring case, spaces, dashes, slashes and underscores,
    /// so "JCAMP-DX", "JCAMPDX" and "jcamp dx" are the same label.
    /// </summary>
    public static string Normalise(ReadOnlySpan<char> raw)
    {
        Span<char> buffer = raw.Length <= 128 ? stackalloc char[raw.Length] : new char[raw.Length];
        var n = 0;
        foreach (var c in raw)
        {
            if (c is ' ' or '\t' or '-' or '/' or '_') continue;
            buffer[n++] = char.ToUpperInvariant(c);
        }
        return new string(buffer[..n]);
    }
}

/// <summary>A block: the records from ##TITLE= to its ##END=, possibly nested inside a LINK block.</summary>
internal sealed class JcampBlock(int index, string title, int line, JcampBlock? parent)
{
    public int Index { get; } = index;
    public string Title { get; } = title;
    public int Line { get; } = line;
    public JcampBlock? Parent { get; } = parent;
    public List<Ldr> Records { get; } = [];
    public int? EndLine { get; set; }

    public Ldr? First(string label) => Records.Find(r => r.Label == label);

    public string Describe()
    {
        var type = First("DATATYPE")?.Value;
        var id = First("BLOCKID")?.Value;
        return $"block {Index + 1} '{Title}' (line {Line}{(id is null ? "" : $", BLOCK_ID={id}")}{(type is null ? "" : $", DATA TYPE={type}")})";
    }
}

/// <summary>Splits JCAMP-DX text into records and blocks; knows nothing of what the labels mean.</summary>
internal static class JcampScanner
{
    // Labels whose body is a data table, not a continuation of the value.
    private static readonly HashSet<string> TableLabels =
        ["XYDATA", "XYPOINTS", "PEAKTABLE", "DATATABLE", "PEAKASSIGNMENTS", "RADATA", "XYDATATABLE"];

    private const int MaxContinuationChars = 2000;

    public static List<JcampBlock> Scan(string text, string path, List<string> warnings)
    {
        var records = ScanRecords(text, path);
        if (records.Count == 0)
            throw new SpectrumFileException(path, null,
                "no JCAMP-DX labels found: expected lines starting with '##', beginning with ##TITLE=. Is this a JCAMP-DX file?");
        if (records[0].Label != "TITLE")
            throw new SpectrumFileException(path, records[0].Line,
                $"the first label is ##{records[0].RawLabel}= but a JCAMP-DX block must begin with ##TITLE=; add a ##TITLE= line at the top");

        var blocks = new List<JcampBlock>();
        var open = new Stack<JcampBlock>();
        var ignoredOutside = 0;
        foreach (var r in records)
        {
            if (r.Label == "TITLE")
            {
                // A ##TITLE= inside an open block opens a nested block (LINK files).
                var block = new JcampBlock(blocks.Count, r.Value, r.Line, open.Count > 0 ? open.Peek() : null);
                block.Records.Add(r);
                blocks.Add(block);
                open.Push(block);
            }
            else if (r.Label == "END")
            {
                if (open.Count == 0)
                {
                    warnings.Add($"line {r.Line}: ##END= with no open block, ignored");
                    continue;
                }
                open.Pop().EndLine = r.Line;
            }
            else if (open.Count == 0)
            {
                ignoredOutside++;
            }
            else
            {
                open.Peek().Records.Add(r);
            }
        }

        if (open.Count > 0)
        {
            var last = open.Peek();
            var lastLine = CountLines(text);
            throw new SpectrumFileException(path, lastLine,
                $"the file ends inside {last.Describe()} without ##END=: the file is truncated; " +
                "obtain a complete copy (the last line of a JCAMP-DX file is ##END=)");
        }
        if (ignoredOutside > 0)
            warnings.Add($"{ignoredOutside} label(s) after the last ##END= were outside any block and ignored");
        return blocks;
    }

    private static List<Ldr> ScanRecords(string text, string path)
    {
        var records = new List<Ldr>();
        var span = text.AsSpan();
        int pos = 0, lineNo = 0;

        // The record being collected: its label line, and where its body began.
        string? label = null, rawLabel = null, value = null;
        int labelLine = 0, bodyStart = 0;

        while (pos <= span.Length)
        {
            if (pos == span.Length && pos != 0 && span[pos - 1] == '\n') break;
            lineNo++;
            var nl = span[pos..].IndexOf('\n');
            var lineEnd = nl < 0 ? span.Length : pos + nl;
            var line = span[pos..lineEnd].TrimStart(" \t");

            if (line.StartsWith("##"))
            {
                if (label is not null)
                    records.Add(Complete(text, label, rawLabel!, value!, labelLine, bodyStart, pos));
                var eq = line.IndexOf('=');
                if (eq < 0)
                    throw new SpectrumFileException(path, lineNo,
                        $"label line '{Shorten(line)}' has no '=': expected ##LABEL= value");
                rawLabel = line[2..eq].Trim().ToString();
                label = Ldr.Normalise(rawLabel);
                value = StripComment(line[(eq + 1)..]).Trim().ToString();
                labelLine = lineNo;
                bodyStart = lineEnd < span.Length ? lineEnd + 1 : span.Length;
            }
            if (nl < 0) break;
            pos = lineEnd + 1;
        }
        if (label is not null)
            records.Add(Complete(text, label, rawLabel!, value!, labelLine, bodyStart, span.Length));

        // "##=" is the 4.24 comment label.
        records.RemoveAll(r => r.Label.Length == 0);
        return records;
    }

    private static Ldr Complete(string text, string label, string rawLabel, string value, int line, int bodyStart, int bodyEnd)
    {
        if (!TableLabels.Contains(label) && bodyEnd > bodyStart)
            value = JoinContinuation(value, text.AsSpan(bodyStart, bodyEnd - bodyStart));
        return new Ldr(label, rawLabel, value, line, bodyStart, bodyEnd);
    }

    // A value may run on over several lines (a long TITLE); keep it bounded so a mislabelled
    // data table does not turn into a megabyte header value.
    private static string JoinContinuation(string value, ReadOnlySpan<char> body)
    {
        var sb = new StringBuilder(value);
        foreach (var raw in body.EnumerateLines())
        {
            var piece = StripComment(raw).Trim();
            if (piece.IsEmpty) continue;
            if (sb.Length + piece.Length > MaxContinuationChars) break;
            if (sb.Length > 0) sb.Append(' ');
            sb.Append(piece);
        }
        return sb.ToString();
    }

    /// <summary>Removes a "$$" comment and what follows it on the line.</summary>
    public static ReadOnlySpan<char> StripComment(ReadOnlySpan<char> line)
    {
        var i = line.IndexOf("$$");
        return i < 0 ? line : line[..i];
    }

    private static string Shorten(ReadOnlySpan<char> s) => s.Length <= 40 ? s.ToString() : s[..40].ToString() + "...";

    private static int CountLines(string text)
    {
        var n = text.AsSpan().Count('\n');
        return text.EndsWith('\n') ? n : n + 1;
    }
}
