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
    /// The delay found from the data: the index of the largest |s| among the first points, refined to a fraction of a
    /// point by a parabola through the three points around it; 0 when the largest point is the first.
    /// </summary>
    public static double FromData(ReadOnlySpan<Complex> fid)
    {
        var n = Math.Min(fid.Length / 4, SearchPoints);
        var top = 0;
        for (var k = 1; k < n; k++)
            if (fid[k].Magnitude > fid[top].Magnitude) top = k;
        if (top == 0 || top == n - 1) return top;
        double a = fid[top - 1].Magnitude, b = fid[top].Magnitude, c = fid[top + 1].Magnitude;
        var curvature = a - 2 * b + c;
        return curvature < 0 ? top + 0.5 * (a - c) / curvature : top;
    }
}
