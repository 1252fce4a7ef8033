namespace SpinSim.Core.Spectrum;

/// <summary>
/// A zero-order phase error for synthetic data: the observed trace is Re[e^(i phi) (A + i D)] = A cos phi - D sin phi, where
/// A is the absorption trace and D the dispersion of the same lines (Lorentzian: (1/pi) x / (x^2 + (G/2)^2); Voigt and
/// Gaussian: the imaginary part of the Faddeeva profile). For demonstrations and tests of fitting only.
/// </summary>
public static class PhaseError
{
    /// <summary>Dispersion is evaluated within this many widths of each line, like the absorption.</summary>
    public const double CutoffFwhm = TraceSynthesizer.DefaultCutoffFwhm;

    public static double[] Apply(double[] absorption, ReadOnlySpan<RenderLine> lines, SpectrumGrid grid, Lineshape shape, double phaseDeg)
    {
        var phase = phaseDeg * Math.PI / 180;
        var result = absorption.Select(a => a * Math.Cos(phase)).ToArray();
        var sin = Math.Sin(phase);
        if (sin == 0) return result;
        foreach (var line in lines)
        {
            var profile = shape.Profile(line.FwhmHz);
            var reach = CutoffFwhm * line.FwhmHz;
            for (var i = 0; i < grid.Points; i++)
            {
                var dx = grid.HzAt(i) - line.CentreHz;
                if (Math.Abs(dx) > reach) continue;
                result[i] -= sin * line.Area * profile.Dispersion(dx);
            }
        }
        return result;
    }
}
