using System.Globalization;
using System.Text.RegularExpressions;

namespace SpinSim.Tests.Support;

public enum NistDifficulty { Lower, Average, Higher }

/// <summary>
/// One NIST StRD nonlinear-regression file (NIST StRD nonlinear regression, ITL), as its header lays it out:
/// start vectors and certified values on the lines the header names, data on the lines it names.
/// </summary>
public sealed record NistStrdFile(
    string Name,
    NistDifficulty Difficulty,
    double[] Start1,
    double[] Start2,
    double[] Certified,
    double[] CertifiedStandardDeviations,
    double CertifiedResidualSumOfSquares,
    double CertifiedResidualStandardDeviation,
    int StatedDegreesOfFreedom,
    double[] Y,
    double[][] X)
{
    public int ParameterCount => Certified.Length;

    public int ObservationCount => Y.Length;

    public static IReadOnlyList<string> AllNames { get; } =
    [
        "Misra1a", "Chwirut2", "Chwirut1", "Lanczos3", "Gauss1", "Gauss2", "DanWood", "Misra1b",
        "Kirby2", "Hahn1", "Nelson", "MGH17", "Lanczos1", "Lanczos2", "Gauss3", "Misra1c", "Misra1d", "Roszman1", "ENSO",
        "MGH09", "Thurber", "BoxBOD", "Rat42", "MGH10", "Eckerle4", "Rat43", "Bennett5",
    ];

    public static NistStrdFile Load(string name) => Parse(name, File.ReadAllLines(ReferenceData.PathOf("nist-strd", name + ".dat")));

    private static readonly Regex LineRange = new(@"^\s*(Starting Values|Certified Values|Data)\s*\(lines\s+(\d+)\s+to\s+(\d+)\)", RegexOptions.IgnoreCase);
    private static readonly Regex ParameterLine = new(@"^\s*b(\d+)\s*=\s*(\S+)\s+(\S+)\s+(\S+)\s+(\S+)\s*$");

    public static NistStrdFile Parse(string name, string[] lines)
    {
        var ranges = new Dictionary<string, (int First, int Last)>(StringComparer.OrdinalIgnoreCase);
        foreach (var line in lines.Take(20))
        {
            var m = LineRange.Match(line);
            if (m.Success) ranges[m.Groups[1].Value] = (int.Parse(m.Groups[2].Value), int.Parse(m.Groups[3].Value));
        }
        if (ranges.Count != 3) throw new FormatException($"{name}: header does not state the three line ranges");

        var difficulty = lines.Any(l => l.Contains("Lower Level of Difficulty")) ? NistDifficulty.Lower
            : lines.Any(l => l.Contains("Average Level of Difficulty")) ? NistDifficulty.Average
            : lines.Any(l => l.Contains("Higher Level of Difficulty")) ? NistDifficulty.Higher
            : throw new FormatException($"{name}: no level of difficulty stated");

        var (s1, s2, cert, sd) = (new List<double>(), new List<double>(), new List<double>(), new List<double>());
        var (startFirst, startLast) = ranges["Starting Values"];
        for (int i = startFirst; i <= startLast; i++)
        {
            var m = ParameterLine.Match(lines[i - 1]);
            if (!m.Success || int.Parse(m.Groups[1].Value) != s1.Count + 1)
                throw new FormatException($"{name} line {i}: expected parameter b{s1.Count + 1}");
            s1.Add(Number(m.Groups[2].Value)); s2.Add(Number(m.Groups[3].Value));
            cert.Add(Number(m.Groups[4].Value)); sd.Add(Number(m.Groups[5].Value));
        }

        double rss = double.NaN, rsd = double.NaN; int dof = -1, n = -1;
        var (certFirst, certLast) = ranges["Certified Values"];
        for (int i = startLast + 1; i <= certLast; i++)
        {
            var line = lines[i - 1];
            var value = line.Contains(':') ? line[(line.IndexOf(':') + 1)..].Trim() : "";
            if (line.Contains("Residual Sum of Squares")) rss = Number(value);
            else if (line.Contains("Residual Standard Deviation")) rsd = Number(value);
            else if (line.Contains("Degrees of Freedom")) dof = int.Parse(value, CultureInfo.InvariantCulture);
            else if (line.Contains("Number of Observations")) n = int.Parse(value, CultureInfo.InvariantCulture);
        }
        if (double.IsNaN(rss) || double.IsNaN(rsd) || dof < 0 || n < 0) throw new FormatException($"{name}: certified statistics incomplete");

        var (dataFirst, dataLast) = ranges["Data"];
        var y = new List<double>();
        var x = new List<double[]>();
        for (int i = dataFirst; i <= dataLast; i++)
        {
            var fields = lines[i - 1].Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries).Select(Number).ToArray();
            if (fields.Length < 2) throw new FormatException($"{name} line {i}: expected y and x");
            y.Add(fields[0]);
            x.Add(fields[1..]);
        }
        if (y.Count != n) throw new FormatException($"{name}: {y.Count} data lines, header says {n} observations");

        return new NistStrdFile(name, difficulty, [.. s1], [.. s2], [.. cert], [.. sd], rss, rsd, dof, [.. y], [.. x]);
    }

    private static double Number(string s) => double.Parse(s, NumberStyles.Float, CultureInfo.InvariantCulture);
}
