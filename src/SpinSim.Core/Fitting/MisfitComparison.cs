// Method: R-factor ratio test, W. C. Hamilton, Acta Cryst. 18, 502 (1965), with the effective number of independent points of G. V. Bayley and J. M. Hammersley, J. R. Stat. Soc. Suppl. 8, 184 (1946).
using MathNet.Numerics.Distributions;

namespace SpinSim.Core.Fitting;

/// <summary>
/// Whether a second optimum of the same model fits the data worse than the best by more than noise: Hamilton's test of
/// one discrete hypothesis (b = 1) on the ratio of residual sums of squares, R_alt^2 / R_best^2 = 1 + F(1, n - p) / (n - p),
/// where n counts independent points. Neighbouring points of a spectrum are correlated (the lineshape oversamples,
/// filters colour the noise), so n is the effective number: the fitted points divided by the integrated autocorrelation
/// time of the residuals, 1 + 2 sum (1 - k/m) rho_k.
/// </summary>
public static class MisfitComparison
{
    /// <summary>Below this probability a worse optimum counts as significantly worse (a 5 % test).</summary>
    public const double SignificanceLevel = 0.05;

    /// <summary>
    /// Effective number of independent points in residual runs (each run contiguous; gaps between regions cut the
    /// correlation). The autocorrelation sum of each run stops at the first lag where it is no longer positive.
    /// </summary>
    public static double EffectivePoints(IEnumerable<double[]> runs)
    {
        double effective = 0;
        foreach (var run in runs)
        {
            var m = run.Length;
            if (m == 0) continue;
            var mean = run.Average();
            double variance = 0;
            foreach (var r in run) variance += (r - mean) * (r - mean);
            if (m < 4 || variance == 0) { effective += m; continue; }
            double tau = 1;
            for (var k = 1; k < m / 2; k++)
            {
                double sum = 0;
                for (var i = 0; i + k < m; i++) sum += (run[i] - mean) * (run[i + k] - mean);
                var rho = sum / variance;
                if (rho <= 0) break;
                tau += 2 * (1 - (double)k / m) * rho;
            }
            effective += m / tau;
        }
        return effective;
    }

    /// <summary>
    /// Probability, under the hypothesis that the worse optimum is as good a description of the data as the best, of a
    /// misfit ratio at least <paramref name="ratio"/> (= RSS_worse / RSS_best, at least 1), with
    /// <paramref name="effectivePoints"/> independent points and <paramref name="freeParameters"/> free values.
    /// </summary>
    public static double Probability(double ratio, double effectivePoints, int freeParameters)
    {
        var dof = effectivePoints - freeParameters;
        if (!(dof >= 1)) return 1; // too few independent points to tell anything apart
        if (!(ratio > 1)) return 1;
        var f = (ratio - 1) * dof;
        return 1 - FisherSnedecor.CDF(1, dof, f);
    }

    /// <summary>The largest misfit ratio that the test still calls indistinguishable from the best.</summary>
    public static double CriticalRatio(double effectivePoints, int freeParameters, double level = SignificanceLevel)
    {
        var dof = effectivePoints - freeParameters;
        if (!(dof >= 1)) return double.PositiveInfinity;
        return 1 + FisherSnedecor.InvCDF(1, dof, 1 - level) / dof;
    }
}
