using SpinSim.Core.Traces;
using SpinSim.Formats.Jcamp;

namespace SpinSim.Tests.Formats.Jcamp;

/// <summary>Small JCAMP-DX texts and traces made for the tests (not outside data).</summary>
internal static class JcampSamples
{
    /// <summary>A minimal 1D NMR block around the given data lines, x in PPM, factors 1.</summary>
    public static string Minimal(string dataLines, int npoints, double firstX, double lastX, string extraHeader = "", string version = "5.01")
    {
        var deltaX = npoints > 1 ? (lastX - firstX) / (npoints - 1) : 0;
        return string.Join("\n",
            "##TITLE= test block",
            $"##JCAMP-DX= {version}",
            "##DATA TYPE= NMR SPECTRUM",
            "##.OBSERVE FREQUENCY= 400.0",
            "##.OBSERVE NUCLEUS= ^1H",
            "##XUNITS= PPM",
            "##YUNITS= ARBITRARY UNITS",
            "##XFACTOR= 1",
            "##YFACTOR= 1",
            FormattableString.Invariant($"##FIRSTX= {firstX}"),
            FormattableString.Invariant($"##LASTX= {lastX}"),
            FormattableString.Invariant($"##DELTAX= {deltaX}"),
            $"##NPOINTS= {npoints}") + "\n"
            + extraHeader
            + "##XYDATA= (X++(Y..Y))\n"
            + dataLines.TrimEnd('\n') + "\n"
            + "##END=\n";
    }

    /// <summary>A synthetic trace: two Lorentzian lines on seeded noise, evenly spaced, high to low ppm by default.</summary>
    public static SpectrumTrace Synthetic(int n, int seed = 7, bool descending = true, double observeMHz = 400.13)
    {
        var random = new Random(seed);
        var ppm = new double[n];
        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            var t = n > 1 ? (double)i / (n - 1) : 0;
            ppm[i] = descending ? 10.0 - 10.5 * t : -0.5 + 10.5 * t;
            y[i] = 1000 / (1 + Math.Pow((ppm[i] - 3.21) / 0.004, 2))
                   + 400 / (1 + Math.Pow((ppm[i] - 1.18) / 0.003, 2))
                   + (random.NextDouble() - 0.5);
        }
        return new SpectrumTrace(ppm, y, observeMHz, "1H", TraceOrigin.Describe("synthetic test trace"));
    }

    public static string Write(SpectrumTrace trace, JcampForm form, params string[] comments)
    {
        var writer = new StringWriter();
        JcampWriter.Write(trace, writer, form, comments);
        return writer.ToString();
    }

    /// <summary>1-based number of the first line satisfying <paramref name="predicate"/>.</summary>
    public static int LineOf(string text, Func<string, bool> predicate)
    {
        var lines = text.Split('\n');
        for (var i = 0; i < lines.Length; i++)
            if (predicate(lines[i].TrimEnd('\r'))) return i + 1;
        throw new InvalidOperationException("no such line");
    }

    public static string[] Lines(string text) => text.Split('\n').Select(l => l.TrimEnd('\r')).ToArray();

    public static string Join(IEnumerable<string> lines) => string.Join("\n", lines);
}
