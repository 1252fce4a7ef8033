// Dip criterion for resolved maxima, a Rayleigh-like rule: common practice, no source.
namespace SpinSim.Core.Planning;

/// <summary>
/// Counts the lines one would tell apart in a rendered trace.
/// </summary>
/// <remarks>
/// The criterion: take the local maxima of the trace that reach at least <see cref="FloorFraction"/> of its
/// tallest point (weaker ones are combination lines and tails nobody would count). Walk them in order; two
/// neighbouring maxima are separate lines when the lowest point between them is below <see cref="DipFraction"/>
/// of the lower of the two, otherwise they are one line, represented from then on by the taller. The count is
/// the number of lines left. Like Rayleigh's criterion for two equal lines it asks for a visible dip; for two
/// equal Lorentzians it separates them from a spacing of 0.874 FWHM on (they show no dip at all below
/// 1/sqrt(3) = 0.577 FWHM). The answer depends on the sampling: give at least a few points per linewidth.
/// </remarks>
public static class ResolvedLines
{
    /// <summary>Maxima below this fraction of the tallest point are not counted.</summary>
    public const double FloorFraction = 0.01;

    /// <summary>Two maxima are separate when the dip between them falls below this fraction of the lower maximum.</summary>
    public const double DipFraction = 0.9;

    /// <summary>The number of resolved lines in <paramref name="trace"/> (points in order along the axis); 0 for a flat or empty trace.</summary>
    public static int Count(ReadOnlySpan<double> trace)
    {
        if (trace.Length == 0) return 0;
        var tallest = 0.0;
        foreach (var y in trace) tallest = Math.Max(tallest, y);
        if (!(tallest > 0)) return 0;
        var floor = FloorFraction * tallest;

        var count = 0;
        var current = 0.0;            // height of the line that the next maximum is compared with
        var dip = double.PositiveInfinity; // lowest point since that line
        for (var i = 0; i < trace.Length; i++)
        {
            var y = trace[i];
            if (count > 0) dip = Math.Min(dip, y);
            if (!IsMaximum(trace, i) || y < floor) continue;
            if (count == 0 || dip < DipFraction * Math.Min(current, y))
            {
                count++;
                current = y;
                dip = double.PositiveInfinity;
            }
            else if (y > current)
            {
                // Not separate: the taller maximum stands for the merged line, and the dip is measured from it.
                current = y;
                dip = double.PositiveInfinity;
            }
        }
        return count;
    }

    // A plateau counts once, at its last point: rises to it strictly, never falls below it before it.
    private static bool IsMaximum(ReadOnlySpan<double> trace, int i)
    {
        var right = i == trace.Length - 1 ? double.NegativeInfinity : trace[i + 1];
        if (trace[i] <= right) return false;
        var k = i - 1;
        while (k >= 0 && trace[k] == trace[i]) k--;
        return k < 0 || trace[k] < trace[i];
    }
}
