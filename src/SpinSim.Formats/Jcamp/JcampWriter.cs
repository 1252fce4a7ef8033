// JCAMP-DX 5.01 NMR spectrum writer: McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988); Davies & Lampen, Appl. Spectrosc. 47, 1093 (1993).
using System.Globalization;
using System.Text;
using SpinSim.Core.Traces;

namespace SpinSim.Formats.Jcamp;

/// <summary>How the ordinates of ##XYDATA= are written.</summary>
public enum JcampForm
{
    /// <summary>Plain integers separated by blanks: readable by eye and by any reader.</summary>
    Affn,

    /// <summary>SQZ first value, DIF differences, DUP runs and a Y check per line: about a third of the size.</summary>
    DifDup,
}

/// <summary>
/// Writes a <see cref="SpectrumTrace"/> as a JCAMP-DX 5.01 NMR spectrum, ##XYDATA=(X++(Y..Y)).
/// </summary>
/// <remarks>
/// x is written in HZ: the NMR supplement (Davies &amp; Lampen 1993) describes the axis in Hz with
/// ##.OBSERVE FREQUENCY= and ##.SHIFT REFERENCE= (stated from memory of the paper), and Hz is what
/// instrument exports and the shared test files mostly use, so every reader that handles NMR handles
/// it; a reader that ignores .SHIFT REFERENCE still gets ppm = Hz / MHz because 0 Hz is written at
/// 0 ppm. A trace with no observe frequency cannot be put in Hz and is written in PPM.
/// Ordinates are integers times YFACTOR. YFACTOR is the power of ten that puts the largest magnitude
/// between 2.1e8 and 2^31 - 1: nine to ten significant digits, within a 32-bit integer for readers
/// that use one, and short values such as 2.5 stay exact.
/// An axis that is not evenly spaced (to 0.1 % of a step) cannot be (X++(Y..Y)) and is written as
/// ##XYPOINTS=(XY..XY) pairs.
/// </remarks>
public static class JcampWriter
{
    /// <summary>The longest line written; the standard asks for at most 80 characters.</summary>
    public const int MaxLineLength = 80;

    private const double LargestInteger = int.MaxValue;
    private static readonly CultureInfo Invariant = CultureInfo.InvariantCulture;

    /// <summary>Writes <paramref name="trace"/> to a file at <paramref name="path"/> (created or replaced).</summary>
    public static void Write(SpectrumTrace trace, string path, JcampForm form, IEnumerable<string>? extraComments = null)
    {
        using var writer = new StreamWriter(path, false, new UTF8Encoding(false));
        Write(trace, writer, form, extraComments ?? []);
    }

    /// <summary>
    /// Writes <paramref name="trace"/> to <paramref name="writer"/>. Each of <paramref name="extraComments"/>
    /// becomes one or more "$$" comment lines in the header (e.g. "synthetic trace, not measured").
    /// </summary>
    public static void Write(SpectrumTrace trace, TextWriter writer, JcampForm form, IEnumerable<string> extraComments)
    {
        ArgumentNullException.ThrowIfNull(trace);
        ArgumentNullException.ThrowIfNull(writer);
        ArgumentNullException.ThrowIfNull(extraComments);

        var n = trace.Count;
        var inHz = trace.ObserveMHz is not null;
        var x = inHz ? trace.FrequencyHzAxis() : trace.ShiftPpm;
        var yFactor = YFactorFor(trace.Intensity);
        var y = new long[n];
        for (var i = 0; i < n; i++) y[i] = (long)Math.Round(trace.Intensity[i] / yFactor, MidpointRounding.AwayFromZero);
        var even = IsEvenlySpaced(x);

        var labels = trace.Origin.HeaderLabels;
        Line(writer, $"##TITLE= {OneLine(Label(labels, "TITLE") ?? trace.Origin.Source)}");
        Line(writer, "##JCAMP-DX= 5.01");
        Line(writer, "##DATA TYPE= NMR SPECTRUM");
        Line(writer, $"##DATA CLASS= {(even ? "XYDATA" : "XYPOINTS")}");
        Line(writer, $"##ORIGIN= {OneLine(Label(labels, "ORIGIN") ?? "SpinSim")}");
        Line(writer, $"##OWNER= {OneLine(Label(labels, "OWNER") ?? "not stated")}");
        foreach (var comment in extraComments)
            foreach (var piece in CommentLines(comment))
                Line(writer, piece);
        if (inHz)
        {
            Line(writer, $"##.OBSERVE FREQUENCY= {R(trace.ObserveMHz!.Value)}");
            Line(writer, $"##.OBSERVE NUCLEUS= ^{trace.Nucleus}");
            // 0 Hz is 0 ppm, so point 1 sits at its own ppm: SpinSim's shifts are relative to TMS.
            Line(writer, $"##.SHIFT REFERENCE= INTERNAL, TMS, 1, {R(trace.ShiftPpm[0])}");
            Line(writer, "##XUNITS= HZ");
        }
        else
        {
            Line(writer, $"##.OBSERVE NUCLEUS= ^{trace.Nucleus}");
            Line(writer, "##XUNITS= PPM");
        }
        Line(writer, "##YUNITS= ARBITRARY UNITS");
        Line(writer, "##XFACTOR= 1");
        Line(writer, $"##YFACTOR= {R(yFactor)}");
        Line(writer, $"##FIRSTX= {R(x[0])}");
        Line(writer, $"##LASTX= {R(x[^1])}");
        if (even) Line(writer, $"##DELTAX= {R(n > 1 ? (x[^1] - x[0]) / (n - 1) : 0)}");
        Line(writer, $"##MAXY= {R(y.Max() * yFactor)}");
        Line(writer, $"##MINY= {R(y.Min() * yFactor)}");
        Line(writer, $"##NPOINTS= {n}");
        Line(writer, $"##FIRSTY= {R(y[0] * yFactor)}");
        if (!even)
        {
            Line(writer, "$$ the axis is not evenly spaced, so the points are written as x,y pairs");
            Line(writer, "##XYPOINTS= (XY..XY)");
            for (var i = 0; i < n; i++) Line(writer, $"{R(x[i])}, {y[i].ToString(Invariant)}");
        }
        else
        {
            Line(writer, "##XYDATA= (X++(Y..Y))");
            var xDecimals = AbscissaDecimals(x);
            if (form == JcampForm.DifDup) WriteDifDup(writer, x, y, xDecimals);
            else WriteAffn(writer, x, y, xDecimals);
        }
        Line(writer, "##END=");
    }

    private static void WriteAffn(TextWriter writer, double[] x, long[] y, int xDecimals)
    {
        var sb = new StringBuilder(MaxLineLength);
        var i = 0;
        while (i < y.Length)
        {
            sb.Clear().Append(X(x[i], xDecimals));
            do
            {
                var value = y[i].ToString(Invariant);
                if (sb.Length + 1 + value.Length > MaxLineLength) break;
                sb.Append(' ').Append(value);
                i++;
            } while (i < y.Length);
            Line(writer, sb.ToString());
        }
    }

    // Each line: X, the first ordinate in SQZ, then DIF differences with DUP runs. When a line ends in
    // DIF the next line starts by repeating its last ordinate (the Y check); a last line repeating the
    // final ordinate lets a reader check that one too, as the ISAS DIFDUP test file does.
    private static void WriteDifDup(TextWriter writer, double[] x, long[] y, int xDecimals)
    {
        var sb = new StringBuilder(MaxLineLength);
        var token = new StringBuilder(24);
        var n = y.Length;
        var i = 0;
        while (true)
        {
            sb.Clear().Append(X(x[i], xDecimals));
            AppendPseudo(sb, y[i], SqzPositive, SqzNegative, '@');
            var j = i;
            var endedInDif = false;
            while (j + 1 < n)
            {
                var diff = y[j + 1] - y[j];
                var run = 1;
                while (j + 1 + run < n && y[j + 1 + run] - y[j + run] == diff) run++;
                token.Clear();
                AppendPseudo(token, diff, DifPositive, DifNegative, '%');
                if (run > 1) AppendDup(token, run);
                if (sb.Length + token.Length > MaxLineLength) break;
                sb.Append(token);
                j += run;
                endedInDif = true;
            }
            Line(writer, sb.ToString());
            if (j == n - 1)
            {
                if (endedInDif)
                {
                    sb.Clear().Append(X(x[j], xDecimals));
                    AppendPseudo(sb, y[j], SqzPositive, SqzNegative, '@');
                    Line(writer, sb.ToString());
                }
                return;
            }
            i = endedInDif ? j : j + 1;
        }
    }

    private const string SqzPositive = "ABCDEFGHI";
    private const string SqzNegative = "abcdefghi";
    private const string DifPositive = "JKLMNOPQR";
    private const string DifNegative = "jklmnopqr";

    /// <summary>An integer whose first digit and sign are folded into one pseudo-digit (SQZ or DIF).</summary>
    private static void AppendPseudo(StringBuilder sb, long value, string positive, string negative, char zero)
    {
        if (value == 0) { sb.Append(zero); return; }
        var digits = Math.Abs(value).ToString(Invariant);
        sb.Append((value > 0 ? positive : negative)[digits[0] - '1']).Append(digits, 1, digits.Length - 1);
    }

    /// <summary>A DUP count (the previous value occurs this many times in all): S..Z for 1..8, s for 9.</summary>
    private static void AppendDup(StringBuilder sb, int count)
    {
        var digits = count.ToString(Invariant);
        sb.Append("STUVWXYZs"[digits[0] - '1']).Append(digits, 1, digits.Length - 1);
    }

    private static double YFactorFor(double[] intensity)
    {
        var largest = 0.0;
        foreach (var v in intensity) largest = Math.Max(largest, Math.Abs(v));
        if (!(largest > 0)) return 1;
        var factor = Math.Pow(10, Math.Ceiling(Math.Log10(largest / LargestInteger)));
        // Log10 can land a hair below an exact power of ten; never let the largest integer overflow.
        if (largest / factor > LargestInteger) factor *= 10;
        return double.IsNormal(factor) ? factor : 1;
    }

    private static bool IsEvenlySpaced(double[] x)
    {
        var n = x.Length;
        if (n < 3) return true;
        var step = (x[^1] - x[0]) / (n - 1);
        if (step == 0) return false;
        for (var i = 1; i < n - 1; i++)
            if (Math.Abs(x[i] - (x[0] + step * i)) > 1e-3 * Math.Abs(step)) return false;
        return true;
    }

    // Line abscissae are a check for readers, so three digits beyond the point spacing suffice.
    private static int AbscissaDecimals(double[] x)
    {
        var step = x.Length > 1 ? Math.Abs(x[^1] - x[0]) / (x.Length - 1) : 0;
        if (step == 0) return 6;
        return Math.Clamp((int)Math.Ceiling(-Math.Log10(step)) + 3, 0, 12);
    }

    private static string X(double x, int decimals) => x.ToString("F" + decimals, Invariant);

    private static string R(double v) => v.ToString("R", Invariant);

    private static string? Label(IReadOnlyDictionary<string, string> labels, string name) =>
        labels.TryGetValue(name, out var v) && !string.IsNullOrWhiteSpace(v) ? v : null;

    private static string OneLine(string s)
    {
        var flat = s.ReplaceLineEndings(" ").Trim();
        return flat.Length <= MaxLineLength - 10 ? flat : flat[..(MaxLineLength - 13)] + "...";
    }

    private static IEnumerable<string> CommentLines(string comment)
    {
        const int width = MaxLineLength - 3;
        foreach (var line in comment.ReplaceLineEndings("\n").Split('\n'))
        {
            var rest = line.Trim();
            if (rest.Length == 0) continue;
            while (rest.Length > width)
            {
                var cut = rest.LastIndexOf(' ', width);
                if (cut <= 0) cut = width;
                yield return "$$ " + rest[..cut].TrimEnd();
                rest = rest[cut..].TrimStart();
            }
            yield return "$$ " + rest;
        }
    }

    // JCAMP-DX files conventionally end lines with CR LF, whatever the platform.
    private static void Line(TextWriter writer, string line)
    {
        writer.Write(line);
        writer.Write("\r\n");
    }
}
