// ASCII squeezed difference form (ASDF) and AFFN: McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988), section 5.
using System.Globalization;

namespace SpinSim.Formats.Jcamp;

/// <summary>Which number forms a table used, for the trace's form description.</summary>
[Flags]
internal enum AsdfForms
{
    None = 0,
    Affn = 1,
    Pac = 2,
    Sqz = 4,
    Dif = 8,
    Dup = 16,
}

/// <summary>The x value that starts a data line, and the index of the ordinate it belongs to.</summary>
internal readonly record struct LineAbscissa(double XRaw, int Decimals, int PointIndex, int Line);

/// <summary>Raw (unscaled) ordinates of an (X++(Y..Y)) table, with what is needed to check it.</summary>
internal sealed class XyDataTable(double[] y, int count, List<LineAbscissa> abscissae, AsdfForms forms, int lastDataLine, int firstYDecimals)
{
    public double[] Y { get; } = y;
    public int Count { get; } = count;
    public List<LineAbscissa> Abscissae { get; } = abscissae;
    public AsdfForms Forms { get; } = forms;
    public int LastDataLine { get; } = lastDataLine;
    public int FirstYDecimals { get; } = firstYDecimals;
}

/// <summary>
/// Decodes data lines. Every value's first character says its form (section 5.2 of the standard),
/// so one pass over the characters decodes AFFN, PAC, SQZ, DIF and DUP in any mixture.
/// </summary>
internal static class AsdfDecoder
{
    private enum Kind { Absolute, Dif, Dup }

    private readonly record struct Token(Kind Kind, double Value, int Decimals, long DupCount);

    private const int MaxTokenChars = 64;

    /// <summary>
    /// Decodes an (X++(Y..Y)) table held in text[start..end). In DIF form the first ordinate of a
    /// line repeats the last ordinate of the line before (the Y check): it is compared and dropped.
    /// More than <paramref name="maxPoints"/> ordinates is an error at the line where it happens.
    /// </summary>
    public static XyDataTable DecodeXyData(string text, int start, int end, int firstLine, int expectedPoints, int maxPoints, string path)
    {
        var y = new double[Math.Clamp(expectedPoints, 1, Math.Max(1, end - start))];
        var count = 0;
        var abscissae = new List<LineAbscissa>();
        var forms = AsdfForms.None;
        var lastY = 0.0;
        var haveLastY = false;
        var previousLineEndedInDif = false;
        var lastDataLine = firstLine;
        var firstYDecimals = 0;

        var lineNo = firstLine - 1;
        foreach (var rawLine in new LineEnumerator(text.AsSpan(start, end - start)))
        {
            lineNo++;
            var line = JcampScanner.StripComment(rawLine);
            var pos = 0;
            if (!NextToken(line, ref pos, out var xToken, ref forms, path, lineNo)) continue;
            if (xToken.Kind != Kind.Absolute)
                throw new SpectrumFileException(path, lineNo,
                    "a data line must begin with its abscissa (an X value in plain digits), not a DIF or DUP character");
            lastDataLine = lineNo;

            var firstOnLine = true;
            var lastKind = Kind.Absolute;
            var lastDif = 0.0;
            var hasValueOnLine = false;
            while (NextToken(line, ref pos, out var t, ref forms, path, lineNo))
            {
                switch (t.Kind)
                {
                    case Kind.Absolute:
                        if (firstOnLine && previousLineEndedInDif)
                        {
                            CheckY(t, lastY, path, lineNo);
                            abscissae.Add(new LineAbscissa(xToken.Value, xToken.Decimals, count - 1, lineNo));
                        }
                        else
                        {
                            if (firstOnLine) abscissae.Add(new LineAbscissa(xToken.Value, xToken.Decimals, count, lineNo));
                            if (count == 0) firstYDecimals = t.Decimals;
                            Append(ref y, ref count, t.Value, maxPoints, path, lineNo);
                        }
                        lastY = t.Value;
                        haveLastY = true;
                        lastKind = Kind.Absolute;
                        break;
                    case Kind.Dif:
                        if (firstOnLine)
                            throw new SpectrumFileException(path, lineNo,
                                "the first ordinate of a line is a DIF difference; it must be an absolute value (SQZ or AFFN) so the line can be checked and decoded on its own");
                        lastDif = t.Value;
                        lastY += lastDif;
                        Append(ref y, ref count, lastY, maxPoints, path, lineNo);
                        lastKind = Kind.Dif;
                        break;
                    case Kind.Dup:
                        if (firstOnLine || !haveLastY)
                            throw new SpectrumFileException(path, lineNo,
                                "a DUP repeat count comes before any value on the line; DUP repeats the value or difference just before it");
                        if (t.DupCount < 1)
                            throw new SpectrumFileException(path, lineNo, "a DUP repeat count is 0; counts start at 1 (S)");
                        if (count + t.DupCount - 1 > maxPoints)
                            throw TooMany(path, lineNo, maxPoints);
                        for (long k = 1; k < t.DupCount; k++)
                        {
                            if (lastKind == Kind.Dif) lastY += lastDif;
                            Append(ref y, ref count, lastY, maxPoints, path, lineNo);
                        }
                        break;
                }
                firstOnLine = false;
                hasValueOnLine = true;
            }
            if (!hasValueOnLine)
                throw new SpectrumFileException(path, lineNo,
                    "the line holds an abscissa but no ordinates: expected X followed by Y values; the line is cut short or corrupted");
            previousLineEndedInDif = lastKind == Kind.Dif;
        }
        return new XyDataTable(y, count, abscissae, forms, lastDataLine, firstYDecimals);
    }

    /// <summary>Decodes an (XY..XY) table into raw x and y pairs (AFFN numbers separated by commas, semicolons or blanks).</summary>
    public static (double[] X, double[] Y, int LastDataLine) DecodeXyPoints(string text, int start, int end, int firstLine, int maxPoints, string path)
    {
        var values = new List<double>();
        var forms = AsdfForms.None;
        var lineNo = firstLine - 1;
        var lastDataLine = firstLine;
        var pendingXLine = 0;
        foreach (var rawLine in new LineEnumerator(text.AsSpan(start, end - start)))
        {
            lineNo++;
            var line = JcampScanner.StripComment(rawLine);
            var pos = 0;
            while (NextToken(line, ref pos, out var t, ref forms, path, lineNo))
            {
                if (t.Kind != Kind.Absolute)
                    throw new SpectrumFileException(path, lineNo,
                        "(XY..XY) tables hold plain x,y pairs; DIF and DUP compression is not allowed there");
                if (values.Count / 2 >= maxPoints)
                    throw TooMany(path, lineNo, maxPoints);
                if (values.Count % 2 == 0) pendingXLine = lineNo;
                values.Add(t.Value);
                lastDataLine = lineNo;
            }
        }
        if (values.Count % 2 != 0)
            throw new SpectrumFileException(path, pendingXLine,
                "an x value has no y value: (XY..XY) tables hold x,y pairs; the table is cut short");
        var n = values.Count / 2;
        var x = new double[n];
        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            x[i] = values[2 * i];
            y[i] = values[2 * i + 1];
        }
        return (x, y, lastDataLine);
    }

    private static void CheckY(in Token check, double lastY, string path, int lineNo)
    {
        // The check value is printed with its own number of decimals; it agrees when it equals the
        // running value rounded to that many (integers: exactly).
        var tolerance = 0.5 * Math.Pow(10, -check.Decimals) + 1e-12 * Math.Abs(lastY);
        if (Math.Abs(check.Value - lastY) > tolerance)
            throw new SpectrumFileException(path, lineNo,
                $"DIF Y-check failed: the line starts with {Format(check.Value)}, but in DIF form the first ordinate must repeat " +
                $"the last ordinate of the line before, which decodes to {Format(lastY)}. A line is missing, duplicated or corrupted; " +
                "re-export the file");
    }

    private static string Format(double v) => v.ToString("R", CultureInfo.InvariantCulture);

    private static void Append(ref double[] y, ref int count, double value, int maxPoints, string path, int lineNo)
    {
        if (count >= maxPoints) throw TooMany(path, lineNo, maxPoints);
        if (count == y.Length) Array.Resize(ref y, (int)Math.Min((long)y.Length * 2, Array.MaxLength));
        y[count++] = value;
    }

    private static SpectrumFileException TooMany(string path, int lineNo, int maxPoints) =>
        new(path, lineNo, $"the table holds more ordinates than its point count allows ({maxPoints}): " +
            "##NPOINTS= is too small or lines are duplicated; correct NPOINTS or remove the extra lines");

    /// <summary>
    /// Reads the next value from <paramref name="line"/>. Returns false at the end of the line.
    /// An 'E' or 'e' is an AFFN exponent only inside an AFFN/PAC number and when a sign and a digit
    /// follow (the standard's "E+nn"); otherwise it is the SQZ digit 5 or -5, which is far more
    /// common directly after an abscissa ("16383E2549").
    /// </summary>
    private static bool NextToken(ReadOnlySpan<char> line, ref int pos, out Token token, ref AsdfForms forms, string path, int lineNo)
    {
        token = default;
        var adjoining = true;
        while (pos < line.Length && line[pos] is ' ' or '\t' or ',' or ';' or '\r')
        {
            pos++;
            adjoining = false;
        }
        if (pos >= line.Length) return false;
        if (pos == 0) adjoining = false;

        var c = line[pos];
        Kind kind;
        int lead;          // the first digit carried by a pseudo-digit, or -1 for plain digits
        var negative = false;
        var allowExponent = false;

        if (c is >= '0' and <= '9' or '.')
        {
            kind = Kind.Absolute; lead = -1; allowExponent = true;
            forms |= AsdfForms.Affn;
        }
        else if (c is '+' or '-')
        {
            kind = Kind.Absolute; lead = -1; allowExponent = true;
            negative = c == '-';
            forms |= adjoining || c == '+' ? AsdfForms.Pac : AsdfForms.Affn;
            pos++;
        }
        else if (c == '@') { kind = Kind.Absolute; lead = 0; pos++; forms |= AsdfForms.Sqz; }
        else if (c is >= 'A' and <= 'I') { kind = Kind.Absolute; lead = c - 'A' + 1; pos++; forms |= AsdfForms.Sqz; }
        else if (c is >= 'a' and <= 'i') { kind = Kind.Absolute; lead = c - 'a' + 1; negative = true; pos++; forms |= AsdfForms.Sqz; }
        else if (c == '%') { kind = Kind.Dif; lead = 0; pos++; forms |= AsdfForms.Dif; }
        else if (c is >= 'J' and <= 'R') { kind = Kind.Dif; lead = c - 'J' + 1; pos++; forms |= AsdfForms.Dif; }
        else if (c is >= 'j' and <= 'r') { kind = Kind.Dif; lead = c - 'j' + 1; negative = true; pos++; forms |= AsdfForms.Dif; }
        else if (c is >= 'S' and <= 'Z') { kind = Kind.Dup; lead = c - 'S' + 1; pos++; forms |= AsdfForms.Dup; }
        else if (c == 's') { kind = Kind.Dup; lead = 9; pos++; forms |= AsdfForms.Dup; }
        else if (c == '?')
            throw new SpectrumFileException(path, lineNo,
                "an ordinate is '?' (value not known); SpinSim needs every point of a trace: fill or remove the missing points");
        else
            throw new SpectrumFileException(path, lineNo,
                $"unexpected character '{Printable(c)}' at column {pos + 1} in the data: expected digits, signs, separators or ASDF characters (@A-Ia-i%J-Rj-rS-Zs)");

        // The digits after the first character.
        var digitsStart = pos;
        var dots = 0;
        while (pos < line.Length && (line[pos] is >= '0' and <= '9' || (line[pos] == '.' && kind != Kind.Dup)))
        {
            if (line[pos] == '.') dots++;
            pos++;
        }
        var digits = line[digitsStart..pos];
        var exponentStart = pos;
        if (allowExponent && pos + 2 < line.Length && line[pos] is 'E' or 'e' && line[pos + 1] is '+' or '-' && char.IsAsciiDigit(line[pos + 2]))
        {
            pos += 2;
            while (pos < line.Length && char.IsAsciiDigit(line[pos])) pos++;
        }
        var exponent = line[exponentStart..pos];

        if (lead < 0 && digits.Length == 0)
            throw new SpectrumFileException(path, lineNo,
                $"a sign '{c}' at column {digitsStart} is not followed by digits: expected a number");
        if (dots > 1 || (digits.Length == 1 && dots == 1 && lead < 0))
            throw new SpectrumFileException(path, lineNo, $"'{Shorten(line, digitsStart)}' is not a number: expected digits with at most one decimal point");
        if (digits.Length + 2 + exponent.Length > MaxTokenChars)
            throw new SpectrumFileException(path, lineNo, $"a number of {digits.Length} digits is too long to be a data value; the line is corrupted");

        var decimals = dots == 0 ? 0 : digits.Length - 1 - digits.IndexOf('.');
        if (kind == Kind.Dup)
        {
            long n = lead;
            foreach (var d in digits)
            {
                n = n * 10 + (d - '0');
                if (n > int.MaxValue)
                    throw new SpectrumFileException(path, lineNo, "a DUP repeat count is too large; the line is corrupted");
            }
            token = new Token(kind, 0, 0, n);
            return true;
        }

        double value;
        if (dots == 0 && exponent.IsEmpty && digits.Length <= 17)
        {
            // Plain integers (nearly all ASDF values) need no general parser.
            long n = lead < 0 ? 0 : lead;
            foreach (var d in digits) n = n * 10 + (d - '0');
            value = n;
        }
        else
        {
            Span<char> buffer = stackalloc char[MaxTokenChars];
            var len = 0;
            if (lead >= 0) buffer[len++] = (char)('0' + lead);
            digits.CopyTo(buffer[len..]); len += digits.Length;
            exponent.CopyTo(buffer[len..]); len += exponent.Length;
            if (!double.TryParse(buffer[..len], NumberStyles.Float, CultureInfo.InvariantCulture, out value) || !double.IsFinite(value))
                throw new SpectrumFileException(path, lineNo, $"'{buffer[..len].ToString()}' is not a usable number (out of range or malformed)");
        }
        token = new Token(kind, negative ? -value : value, decimals, 0);
        return true;
    }

    private static string Printable(char c) => c is >= ' ' and <= '~' ? c.ToString() : $"\\u{(int)c:X4}";

    private static string Shorten(ReadOnlySpan<char> line, int from)
    {
        var s = line[Math.Max(0, from - 1)..];
        return s.Length <= 24 ? s.ToString() : s[..24].ToString() + "...";
    }
}

/// <summary>
/// Lines split at '\n' only, so that line numbers agree with the label scanner's; a '\r' left at
/// the end of a line is treated by the decoder as a blank.
/// </summary>
internal ref struct LineEnumerator(ReadOnlySpan<char> text)
{
    private ReadOnlySpan<char> _rest = text;
    private bool _done = text.IsEmpty;

    public ReadOnlySpan<char> Current { get; private set; }

    public readonly LineEnumerator GetEnumerator() => this;

    public bool MoveNext()
    {
        if (_done) return false;
        var nl = _rest.IndexOf('\n');
        if (nl < 0)
        {
            Current = _rest;
            _done = true;
            return true;
        }
        Current = _rest[..nl];
        _rest = _rest[(nl + 1)..];
        _done = _rest.IsEmpty;
        return true;
    }
}
