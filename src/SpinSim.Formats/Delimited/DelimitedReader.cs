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

        var warnings = new List<string>();
        var firstData = lines.Count > 1 ? lines[1].Text : lines[0].Text;
        o = WithDetectedDecimalComma(o, firstData, sourceName, lines.Count > 1 ? lines[1].Number : lines[0].Number, warnings);
        var separator = o.Separator == ColumnSeparator.Auto ? Detect(lines[0].Text, o.DecimalMark) : o.Separator;
        if (separator == ColumnSeparator.Comma && o.DecimalMark == DecimalMark.Comma)
            throw new SpectrumFileException(sourceName, null,
                "comma as both column separator and decimal mark is ambiguous: choose semicolon, tab or whitespace columns");

        var firstFields = Split(lines[0].Text, separator);
        var hasHeader = o.HasHeader ?? !firstFields.All(f => TryNumber(f, o.DecimalMark, out _));
        var header = hasHeader ? firstFields : null;
        o = WithoutIndexColumn(o, lines, hasHeader ? 1 : 0, separator, header, warnings);
        var xCol = Column(o.XColumnName, o.XColumnIndex, header, "x", sourceName, lines[0].Number);
        var yCol = Column(o.YColumnName, o.YColumnIndex, header, "intensity", sourceName, lines[0].Number);
        var xUnit = o.XUnit ?? UnitFromHeader(header, xCol, warnings);
        if (xUnit == DelimitedXUnit.Hz && o.ObserveMHz is null)
            throw new SpectrumFileException(sourceName, lines[0].Number,
                $"the x column {Describe(header, xCol)} is in Hz, which needs the observe frequency (MHz) to give ppm: give the observe frequency (--observe-mhz)");

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
        if (xUnit == DelimitedXUnit.Hz)
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
                   $"decimal {o.DecimalMark.ToString().ToLowerInvariant()}, x {Describe(header, xCol)} in {xUnit.ToString().ToLowerInvariant()}, " +
                   $"intensity {Describe(header, yCol)}";
        var labels = new Dictionary<string, string>();
        if (header is not null) labels["columns"] = string.Join(", ", header);
        var origin = new TraceOrigin(sourceName, "delimited text", form, warnings.ToArray(), labels);
        return new SpectrumTrace(ppm, y, o.ObserveMHz, o.Nucleus, origin);
    }

    private static void Validate(DelimitedOptions o, string path)
    {
        if (o.XColumnIndex < 0 || o.YColumnIndex < 0)
            throw new SpectrumFileException(path, null, "column indices count from 0 and cannot be negative");
        if (o.ObserveMHz is { } mhz && !(double.IsFinite(mhz) && mhz > 0))
            throw new SpectrumFileException(path, null, $"observe frequency {mhz} MHz is not a positive number");
        if (string.IsNullOrWhiteSpace(o.Nucleus))
            throw new SpectrumFileException(path, null, "the nucleus must be named, e.g. 1H");
    }

    /// <summary>Hz when the x column's header names the unit Hz ("Hz", "freq_Hz", "frequency (Hz)"), else ppm.</summary>
    private static DelimitedXUnit UnitFromHeader(string[]? header, int xCol, List<string> warnings)
    {
        if (header is null || xCol >= header.Length) return DelimitedXUnit.Ppm;
        var words = header[xCol].Split([' ', '_', '(', ')', '[', ']', '/', '-', '.'], StringSplitOptions.RemoveEmptyEntries);
        if (!words.Any(w => w.Equals("hz", StringComparison.OrdinalIgnoreCase))) return DelimitedXUnit.Ppm;
        warnings.Add($"the x column '{header[xCol]}' names Hz, so x was read in Hz (0 Hz at 0 ppm)");
        return DelimitedXUnit.Hz;
    }

    /// <summary>
    /// A first column that counts points (0, 1, 2, ... or 1, 2, 3, ...) is an index, not a shift: with the default columns
    /// and at least three columns, x and intensity are taken from the next two.
    /// </summary>
    private static DelimitedOptions WithoutIndexColumn(DelimitedOptions o, List<(int Number, string Text)> lines, int first, ColumnSeparator separator,
        string[]? header, List<string> warnings)
    {
        if (o.XColumnName is not null || o.YColumnName is not null || o.XColumnIndex != 0 || o.YColumnIndex != 1) return o;
        var check = Math.Min(lines.Count - first, 50);
        if (check < 3) return o;
        double? start = null;
        for (var k = 0; k < check; k++)
        {
            var fields = Split(lines[first + k].Text, separator);
            if (fields.Length < 3 || !TryNumber(fields[0], o.DecimalMark, out var v)) return o;
            start ??= v;
            if (start is not (0 or 1) || v != start + k) return o;
        }
        warnings.Add($"the first column{(header is null ? "" : $" '{header[0]}'")} counts points ({start}, {start + 1}, ...), so x and intensity were read from the next two columns");
        return o with { XColumnIndex = 1, YColumnIndex = 2 };
    }

    /// <summary>
    /// Numbers such as "7,26" in a file whose columns are separated by semicolons, tabs or blanks are written with a
    /// decimal comma; with a comma as separator the two cannot be told apart, and the message names the options.
    /// </summary>
    private static DelimitedOptions WithDetectedDecimalComma(DelimitedOptions o, string line, string path, int lineNumber, List<string> warnings)
    {
        if (o.DecimalMark == DecimalMark.Comma || !line.Contains(',')) return o;
        var separator = o.Separator;
        if (separator == ColumnSeparator.Auto)
            separator = line.Contains('\t') ? ColumnSeparator.Tab : line.Contains(';') ? ColumnSeparator.Semicolon
                : line.Contains(' ') ? ColumnSeparator.Whitespace : ColumnSeparator.Comma;
        if (separator == ColumnSeparator.Comma)
        {
            if (o.Separator == ColumnSeparator.Auto && Split(line, ColumnSeparator.Comma).Length > 2 && line.Split(',').All(f => f.Trim().All(c => char.IsAsciiDigit(c) || c is '-' or '+')))
                throw new SpectrumFileException(path, lineNumber,
                    "the line holds only whole numbers and commas, so the commas may be decimal marks or separators: " +
                    "give the column separator (--separator semicolon, tab or space) and --decimal-comma if numbers use a decimal comma");
            return o;
        }
        var fields = Split(line, separator);
        if (fields.Length >= 2 && fields.All(f => TryNumber(f, DecimalMark.Comma, out _)) && fields.Any(f => f.Contains(',')))
        {
            warnings.Add($"numbers are written with a decimal comma (line {lineNumber}: '{line.Trim()}'), so they were read so");
            return o with { DecimalMark = DecimalMark.Comma, Separator = separator };
        }
        return o;
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
