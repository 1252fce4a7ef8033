using System.Globalization;
using SpinSim.Core.Traces;

namespace SpinSim.Formats.Delimited;

/// <summary>
/// Reads a trace from delimited text: one point per line, x (ppm or Hz) and intensity in chosen
/// columns. Every defect is a <see cref="SpectrumFileException"/> naming the line.
/// </summary>
public static class DelimitedReader
{
    /// <summary>Reads the file at <paramref name="path"/>; options default to auto-detected columns 0 (x, ppm) and 1 (intensity).</summary>
    /// <exception cref="SpectrumFileException">The file cannot be read or holds a defect.</exception>
    public static SpectrumTrace Read(string path, DelimitedOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(path);
        var text = SpectrumFiles.ReadText(path);
        return Parse(text, path, options);
    }

    /// <summary>Reads delimited text; <paramref name="sourceName"/> names it in messages and in the trace's origin.</summary>
    /// <exception cref="SpectrumFileException">The text holds a defect or the options cannot apply to it.</exception>
    public static SpectrumTrace Parse(string text, string sourceName, DelimitedOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        ArgumentNullException.ThrowIfNull(sourceName);
        var o = options ?? new DelimitedOptions();
        Validate(o, sourceName);

        var lines = ContentLines(text);
        if (lines.Count == 0)
            throw new SpectrumFileException(sourceName, null, "the file is empty: expected lines of x and intensity values");

        var separator = o.Separator == ColumnSeparator.Auto ? Detect(lines[0].Text, o.DecimalMark) : o.Separator;
        if (separator == ColumnSeparator.Comma && o.DecimalMark == DecimalMark.Comma)
            throw new SpectrumFileException(sourceName, null,
                "comma as both column separator and decimal mark is ambiguous: choose semicolon, tab or whitespace columns");

        var firstFields = Split(lines[0].Text, separator);
        var hasHeader = o.HasHeader ?? !firstFields.All(f => TryNumber(f, o.DecimalMark, out _));
        var header = hasHeader ? firstFields : null;
        var xCol = Column(o.XColumnName, o.XColumnIndex, header, "x", sourceName, lines[0].Number);
        var yCol = Column(o.YColumnName, o.YColumnIndex, header, "intensity", sourceName, lines[0].Number);

        var first = hasHeader ? 1 : 0;
        if (lines.Count <= first)
            throw new SpectrumFileException(sourceName, lines[0].Number, "the file has a header but no data lines");
        var x = new double[lines.Count - first];
        var y = new double[lines.Count - first];
        for (var k = first; k < lines.Count; k++)
        {
            var (number, line) = lines[k];
            var fields = Split(line, separator);
            var needed = Math.Max(xCol, yCol) + 1;
            if (fields.Length < needed)
                throw new SpectrumFileException(sourceName, number,
                    $"the line has {fields.Length} column(s) but column {needed - 1} (0-based) is needed; " +
                    $"check the separator ({separator}) or the column choice");
            x[k - first] = Value(fields[xCol], o, sourceName, number, Describe(header, xCol));
            y[k - first] = Value(fields[yCol], o, sourceName, number, Describe(header, yCol));
        }

        double[] ppm = x;
        if (o.XUnit == DelimitedXUnit.Hz)
        {
            ppm = new double[x.Length];
            for (var i = 0; i < x.Length; i++)
            {
                ppm[i] = x[i] / o.ObserveMHz!.Value;
                if (!double.IsFinite(ppm[i]))
                    throw new SpectrumFileException(sourceName, lines[i + first].Number, "x in Hz over the observe frequency overflows; check the observe frequency");
            }
        }

        var form = $"{separator.ToString().ToLowerInvariant()}-separated, {(hasHeader ? "header" : "no header")}, " +
                   $"decimal {o.DecimalMark.ToString().ToLowerInvariant()}, x {Describe(header, xCol)} in {o.XUnit.ToString().ToLowerInvariant()}, " +
                   $"intensity {Describe(header, yCol)}";
        var labels = new Dictionary<string, string>();
        if (header is not null) labels["columns"] = string.Join(", ", header);
        var origin = new TraceOrigin(sourceName, "delimited text", form, [], labels);
        return new SpectrumTrace(ppm, y, o.ObserveMHz, o.Nucleus, origin);
    }

    private static void Validate(DelimitedOptions o, string path)
    {
        if (o.XColumnIndex < 0 || o.YColumnIndex < 0)
            throw new SpectrumFileException(path, null, "column indices count from 0 and cannot be negative");
        if (o.ObserveMHz is { } mhz && !(double.IsFinite(mhz) && mhz > 0))
            throw new SpectrumFileException(path, null, $"observe frequency {mhz} MHz is not a positive number");
        if (o.XUnit == DelimitedXUnit.Hz && o.ObserveMHz is null)
            throw new SpectrumFileException(path, null, "x in Hz needs the observe frequency to give ppm: set the observe frequency (MHz)");
        if (string.IsNullOrWhiteSpace(o.Nucleus))
            throw new SpectrumFileException(path, null, "the nucleus must be named, e.g. 1H");
    }

    private static List<(int Number, string Text)> ContentLines(string text)
    {
        var lines = new List<(int, string)>();
        var number = 0;
        foreach (var raw in text.AsSpan().EnumerateLines())
        {
            number++;
            var line = raw.Trim();
            if (number == 1) line = line.TrimStart('\uFEFF');
            if (line.IsEmpty || line[0] == '#') continue;
            lines.Add((number, line.ToString()));
        }
        return lines;
    }

    private static ColumnSeparator Detect(string line, DecimalMark mark)
    {
        if (line.Contains('\t')) return ColumnSeparator.Tab;
        if (line.Contains(';')) return ColumnSeparator.Semicolon;
        if (line.Contains(',') && mark == DecimalMark.Point) return ColumnSeparator.Comma;
        return ColumnSeparator.Whitespace;
    }

    private static string[] Split(string line, ColumnSeparator separator)
    {
        var fields = separator switch
        {
            ColumnSeparator.Comma => line.Split(','),
            ColumnSeparator.Semicolon => line.Split(';'),
            ColumnSeparator.Tab => line.Split('\t'),
            _ => line.Split([' ', '\t'], StringSplitOptions.RemoveEmptyEntries),
        };
        for (var i = 0; i < fields.Length; i++) fields[i] = fields[i].Trim().Trim('"').Trim();
        return fields;
    }

    private static int Column(string? name, int index, string[]? header, string role, string path, int headerLine)
    {
        if (name is null) return index;
        if (header is null)
            throw new SpectrumFileException(path, headerLine,
                $"the {role} column is chosen by name ('{name}') but the file has no header line; choose it by index instead");
        var found = Array.FindIndex(header, h => h.Equals(name.Trim(), StringComparison.OrdinalIgnoreCase));
        if (found < 0)
            throw new SpectrumFileException(path, headerLine,
                $"no column named '{name}' in the header; the columns are: {string.Join(", ", header.Select(h => $"'{h}'"))}");
        return found;
    }

    private static string Describe(string[]? header, int column) =>
        header is not null && column < header.Length ? $"'{header[column]}'" : $"column {column}";

    private static double Value(string field, DelimitedOptions o, string path, int line, string column)
    {
        if (TryNumber(field, o.DecimalMark, out var v)) return v;
        var hint = o.DecimalMark == DecimalMark.Point && field.Contains(',') ? " (it has a comma: is the decimal mark a comma?)"
            : o.DecimalMark == DecimalMark.Comma && field.Contains('.') ? " (it has a point: is the decimal mark a point?)"
            : "";
        throw new SpectrumFileException(path, line,
            $"{column} holds '{field}', which is not a finite number{hint}; expected a number with a decimal {o.DecimalMark.ToString().ToLowerInvariant()}");
    }

    private static bool TryNumber(string field, DecimalMark mark, out double value)
    {
        value = 0;
        if (field.Length == 0) return false;
        if (mark == DecimalMark.Comma)
        {
            if (field.Contains('.')) return false;
            field = field.Replace(',', '.');
        }
        return double.TryParse(field, NumberStyles.Float, CultureInfo.InvariantCulture, out value) && double.IsFinite(value);
    }
}
