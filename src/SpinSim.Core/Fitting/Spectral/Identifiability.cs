namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// Discrete ambiguities that a Jacobian cannot show: changes of the parameters that leave the fitted spectrum exactly as it
/// is, such as the sign of J in an AB system, or in AA'BB' the exchange of J_AA' with J_BB' and of J_AB with J_AB'. Each
/// candidate (a coupling's sign, a pair of couplings exchanged) is simulated and compared with the fitted model.
/// </summary>
internal static class Identifiability
{
    /// <summary>Two models closer than this, relative to the tallest point, count as the same spectrum.</summary>
    public const double SameSpectrum = 1e-6;

    /// <summary>Candidate pairs beyond this many are not tried (the check is quadratic in the couplings).</summary>
    private const int MaxPairs = 120;

    public static IEnumerable<string> Check(ParameterLayout layout, SpectralModel model, double[] full)
    {
        // One representative per free value: tied couplings change together and are reported once.
        var couplings = Enumerable.Range(0, layout.Parameters.Count)
            .Where(i => layout.Parameters[i].Kind == ParameterKind.JHz && layout.Parameters[i].Vary)
            .GroupBy(layout.FreeIndexOf).Select(g => g.First()).ToArray();
        if (couplings.Length == 0) yield break;
        var reference = Models(model, full);

        var all = (double[])full.Clone();
        foreach (var i in couplings) all[i] = -all[i];
        var globalFlip = Same(reference, Models(model, all));
        if (globalFlip && couplings.Length > 1)
            yield return "only the relative signs of the couplings follow from this spectrum: changing the sign of every J gives the same spectrum";

        foreach (var i in couplings)
        {
            if (full[i] == 0) continue;
            var flipped = (double[])full.Clone();
            foreach (var m in TiedWith(layout, i)) flipped[m] = -flipped[m];
            var alone = Same(reference, Models(model, flipped));
            // With one coupling, or when only this sign may change, the sign is undetermined.
            if (alone)
                yield return $"the sign of {layout.Parameters[i].Name} cannot be determined from this spectrum: {-full[i]:0.###} Hz gives the same spectrum";
        }

        var tried = 0;
        for (var a = 0; a < couplings.Length && tried < MaxPairs; a++)
            for (var b = a + 1; b < couplings.Length && tried < MaxPairs; b++)
            {
                var (i, j) = (couplings[a], couplings[b]);
                if (layout.FreeIndexOf(i) == layout.FreeIndexOf(j) || Math.Abs(full[i] - full[j]) < 1e-6) continue;
                tried++;
                var swapped = (double[])full.Clone();
                foreach (var m in TiedWith(layout, i)) swapped[m] = full[j];
                foreach (var m in TiedWith(layout, j)) swapped[m] = full[i];
                if (Same(reference, Models(model, swapped)))
                    yield return $"{layout.Parameters[i].Name} ({full[i]:0.###} Hz) and {layout.Parameters[j].Name} ({full[j]:0.###} Hz) can be exchanged without changing the spectrum: which is which cannot be told from it";
            }
    }

    private static IEnumerable<int> TiedWith(ParameterLayout layout, int parameter)
    {
        var f = layout.FreeIndexOf(parameter);
        return f < 0 ? [parameter] : layout.MembersOf(f);
    }

    private static double[][] Models(SpectralModel model, double[] full) =>
        Enumerable.Range(0, model.Data.Count).Select(d => model.Model(full, d)).ToArray();

    private static bool Same(double[][] a, double[][] b)
    {
        for (var d = 0; d < a.Length; d++)
        {
            var scale = a[d].Select(Math.Abs).DefaultIfEmpty(0).Max();
            for (var i = 0; i < a[d].Length; i++)
                if (!(Math.Abs(a[d][i] - b[d][i]) <= SameSpectrum * scale)) return false;
        }
        return true;
    }
}
