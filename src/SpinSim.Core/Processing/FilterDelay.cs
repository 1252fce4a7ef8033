using System.Numerics;

namespace SpinSim.Core.Processing;

/// <summary>
/// The delay, in points, between the start of acquisition and time zero of an FID recorded through a digital
/// oversampling filter. The filter's group delay makes the first points a build-up that carries no signal of its own;
/// the signal's largest magnitude (all lines in phase, nothing yet decayed) marks time zero.
/// </summary>
public static class FilterDelay
{
    /// <summary>Filter delays are searched for within this many first points (instrument filters delay by well under 200).</summary>
    public const int SearchPoints = 512;

    /// <summary>
    /// The delay found from the data: the first point whose |s| reaches half the largest among the first points, followed
    /// uphill to its local maximum (time zero, before the lines dephase), refined to a fraction of a point by a parabola
    /// through the three points around it; 0 when that maximum is the first point. The fraction is approximate (the
    /// automatic first-order phase takes up what is left).
    /// </summary>
    public static double FromData(ReadOnlySpan<Complex> fid)
    {
        var n = Math.Min(fid.Length / 4, SearchPoints);
        var largest = 0.0;
        for (var k = 0; k < n; k++) largest = Math.Max(largest, fid[k].Magnitude);
        var top = 0;
        while (top < n - 1 && fid[top].Magnitude < 0.5 * largest) top++;
        while (top < n - 1 && fid[top + 1].Magnitude > fid[top].Magnitude) top++;
        if (top == 0 || top == n - 1) return top;
        double a = fid[top - 1].Magnitude, b = fid[top].Magnitude, c = fid[top + 1].Magnitude;
        // A build-up far below the top (an exact whole-point delay, or none) gives no curvature to refine with.
        if (a < 0.25 * b) return top;
        var curvature = a - 2 * b + c;
        return curvature < 0 ? top + 0.5 * (a - c) / curvature : top;
    }
}
