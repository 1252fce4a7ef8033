// First-order (n + 1 rule) multiplets: common practice, no source.
using SpinSim.Core.Engine;
using SpinSim.Core.Model;

namespace SpinSim.Core.Planning;

/// <summary>
/// The first-order spectrum of a spin system: what it would look like if every coupling were weak. Each observed
/// entry gives one multiplet centred at its own frequency (delta x SF), split by |J| to every coupling partner; a
/// partner set of n equivalent spin-1/2 nuclei splits it into n + 1 lines with binomial intensities C(n, k) / 2^n.
/// Heteronuclear partners split too. A partner of the same isotope and the same shift does not split: nuclei of
/// equal shift show no coupling to each other in first order (the exact spectrum of such a pair is a singlet).
/// </summary>
/// <remarks>
/// The result is a <see cref="LineList"/> on the engine's scale, so it renders with the same code as the exact
/// spectrum: an entry's multiplet sums to count x 2^(N-1) (N all spins of the system), which is what that entry
/// contributes to Tr(F+ F-) in the exact spectrum, and every line has origin weight 1 on its own entry.
/// Lines are sorted by frequency; coincident lines of one multiplet (a doublet of doublets with equal J) are merged,
/// lines of different entries are not, so each keeps its entry's width.
/// </remarks>
public static class FirstOrderSpectrum
{
    // Offsets closer than this inside one multiplet are one line; far below any linewidth.
    private const double CoincidentHz = 1e-9;

    /// <summary>The first-order lines of the observed entries among <paramref name="entries"/> (all entries when null).</summary>
    /// <exception cref="ArgumentOutOfRangeException">An entry index outside the system.</exception>
    public static LineList Compute(SpinSystem system, IReadOnlyCollection<int>? entries = null)
    {
        ArgumentNullException.ThrowIfNull(system);
        var n = system.Nuclei.Count;
        var chosen = entries ?? Enumerable.Range(0, n).ToArray();
        foreach (var e in chosen)
            if (e < 0 || e >= n) throw new ArgumentOutOfRangeException(nameof(entries), e, $"entry index must lie in 0..{n - 1}");

        var j = system.CouplingMatrixHz();
        var observeMHz = system.Observed.ObserveMHz(system.Field);
        var perNucleus = Math.Pow(2, system.Nuclei.Sum(x => x.Count) - 1);
        var lines = new List<(double FrequencyHz, double Intensity, int Entry)>();
        foreach (var e in chosen.Distinct().Order())
        {
            var nucleus = system.Nuclei[e];
            if (nucleus.Isotope != system.Observed) continue;
            var multiplet = new List<(double OffsetHz, double Weight)> { (0, 1) };
            for (var p = 0; p < n; p++)
            {
                if (p == e || j[e, p] == 0 || !Splits(system, e, p)) continue;
                multiplet = Split(multiplet, Math.Abs(j[e, p]), system.Nuclei[p].Count);
            }
            var centre = system.FrequencyHz(e);
            foreach (var (offset, weight) in multiplet)
                lines.Add((centre + offset, weight * nucleus.Count * perNucleus, e));
        }

        lines.Sort((a, b) => a.FrequencyHz.CompareTo(b.FrequencyHz));
        var result = new Line[lines.Count];
        var origin = new double[lines.Count * n];
        for (var i = 0; i < lines.Count; i++)
        {
            var (f, intensity, entry) = lines[i];
            result[i] = new Line(f, f / observeMHz, intensity);
            origin[i * n + entry] = 1;
        }
        var expected = SpectrumEngine.ExpectedTotalIntensity(system) * (entries is null ? 1 : ObservedShare(system, chosen));
        return new LineList(result, origin, n, observeMHz, expected, 1, lines.Count, "first order",
            ["first order: each entry a multiplet of n + 1 binomial lines per partner set, at its own shift"]);
    }

    /// <summary>False for a partner of the same isotope and the same shift, which does not split in first order.</summary>
    public static bool Splits(SpinSystem system, int entry, int partner) =>
        system.Nuclei[entry].Isotope != system.Nuclei[partner].Isotope
        || system.Nuclei[entry].Shift.Value != system.Nuclei[partner].Shift.Value;

    /// <summary>Convolves a multiplet with the n + 1 binomial lines of n equivalent partners at spacing <paramref name="jHz"/>.</summary>
    private static List<(double OffsetHz, double Weight)> Split(List<(double OffsetHz, double Weight)> multiplet, double jHz, int partners)
    {
        var split = new List<(double OffsetHz, double Weight)>();
        var scale = Math.Pow(2, -partners);
        double binomial = 1;
        for (var k = 0; k <= partners; k++)
        {
            var offset = jHz * (partners / 2.0 - k);
            foreach (var (o, w) in multiplet) split.Add((o + offset, w * binomial * scale));
            binomial = binomial * (partners - k) / (k + 1);
        }
        split.Sort((a, b) => a.OffsetHz.CompareTo(b.OffsetHz));
        var merged = new List<(double OffsetHz, double Weight)>();
        foreach (var (o, w) in split)
        {
            if (merged.Count > 0 && o - merged[^1].OffsetHz <= CoincidentHz) merged[^1] = (merged[^1].OffsetHz, merged[^1].Weight + w);
            else merged.Add((o, w));
        }
        return merged;
    }

    private static double ObservedShare(SpinSystem system, IEnumerable<int> entries)
    {
        var all = system.ObservedNucleusCount;
        var chosen = entries.Distinct().Where(e => system.Nuclei[e].Isotope == system.Observed).Sum(e => system.Nuclei[e].Count);
        return all == 0 ? 0 : (double)chosen / all;
    }
}
