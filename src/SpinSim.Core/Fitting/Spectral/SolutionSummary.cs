using System.Globalization;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// The sign search's report in words, for the text output and the HTML report alike: what was tried, each coupling's
/// relative sign, and the alternative solutions.
/// </summary>
public static class SolutionSummary
{
    /// <summary>"8 starts and 3 sign patterns tried, 2 distinct optima found", or null without a search.</summary>
    public static string? Tried(SolutionSearch? s) => s is null ? null
        : $"{s.StartsTried} start{(s.StartsTried == 1 ? "" : "s")}, {s.SignPatternsTried} sign pattern{(s.SignPatternsTried == 1 ? "" : "s")}" +
          (s.SecondSolutionsTried > 0 ? $" and {s.SecondSolutionsTried} ABX second solution{(s.SecondSolutionsTried == 1 ? "" : "s")}" : "") +
          $" tried, {s.DistinctOptima} distinct optim{(s.DistinctOptima == 1 ? "um" : "a")} found";

    /// <summary>One line per varied coupling: determined relative to which couplings and by how much, or why not.</summary>
    public static IReadOnlyList<string> SignLines(SolutionSearch? s)
    {
        if (s is null || s.Signs.Count == 0) return [];
        var lines = new List<string>();
        if (s.Signs.All(v => !v.Determined))
        {
            lines.Add("relative signs of the couplings: none is determined by this spectrum; the signs shown are the starting ones");
            foreach (var v in s.Signs) lines.Add($"  {v.Parameter}: not determined ({v.Reason})");
            return lines;
        }
        lines.Add($"relative signs of the couplings (Hamilton's test at {MisfitComparison.SignificanceLevel:0%} on {s.EffectivePoints:0} effective independent points):");
        foreach (var v in s.Signs)
            lines.Add(v.Determined
                ? $"  {v.Parameter}: determined relative to {string.Join(", ", v.RelativeTo)}; reversing it raises the misfit {Ratio(v.MisfitRatio)} (probability {Probability(v.Probability)})"
                : $"  {v.Parameter}: not determined ({v.Reason})");
        return lines;
    }

    /// <summary>Lines naming every alternative solution and the parameters that differ, or nothing when there is none.</summary>
    public static IReadOnlyList<string> AlternativeLines(SolutionSearch? s)
    {
        if (s is null || s.Alternatives.Count == 0) return [];
        var lines = new List<string> { $"{s.Alternatives.Count + 1} solutions fit this spectrum equally well; besides the one above:" };
        var k = 2;
        foreach (var a in s.Alternatives)
        {
            lines.Add($"  solution {k++} (misfit x{a.MisfitRatio:0.0000}, probability {Probability(a.Probability)}; reached from {a.Origin}): " +
                      string.Join(", ", a.Differences.Select(d => $"{d.Name} {Value(d.Alternative, d.Unit)} {d.Unit} (not {Value(d.Best, d.Unit)})")));
        }
        lines.Add("  more data decide between them: another field, the region of a coupled partner, or a 2D experiment");
        return lines;
    }

    private static string Ratio(double r) => double.IsNaN(r) ? "(not tried)" : $"x{r.ToString("0.0000", CultureInfo.InvariantCulture)}";

    private static string Probability(double p) =>
        double.IsNaN(p) ? "n/a" : p < 1e-4 ? "< 1e-4" : p.ToString("0.####", CultureInfo.InvariantCulture);

    private static string Value(double v, string unit) =>
        v.ToString(unit == "ppm" ? "0.0000" : "0.00", CultureInfo.InvariantCulture);
}
