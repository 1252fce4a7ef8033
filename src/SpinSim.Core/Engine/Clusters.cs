// Weak-coupling fragments: A. M. Castillo, L. Patiny, J. Wist, J. Magn. Reson. 209, 123 (2011).
using SpinSim.Core.Model;

namespace SpinSim.Core.Engine;

/// <summary>
/// A set of entries diagonalised together, with the entries outside it that couple to it weakly (spectators): their
/// couplings are kept as J Iz Iz only, so each spectator configuration just shifts the cluster's frequencies.
/// </summary>
/// <param name="Entries">Indices of the system's entries in this cluster.</param>
/// <param name="Spectators">Entries outside the cluster with a nonzero coupling to it.</param>
/// <param name="LargestCutRatio">Largest |J| / |delta nu| among the homonuclear couplings from this cluster to its spectators (0 when none).</param>
public sealed record Cluster(int[] Entries, int[] Spectators, double LargestCutRatio);

/// <summary>
/// A coupling between observed nuclei of two clusters, kept only as J Iz Iz. Its flip-flop term, left out, would move
/// energy levels by second-order perturbation: a level of entry A (ladder element L_A) and entry B (L_B) moves by
/// (J/2)^2 L_A^2 L_B^2 / |delta nu|; a line joins two levels pushed in opposite directions, so it moves by up to
/// twice that. With the largest squared ladder element of n equivalent nuclei, g(n) = floor((n + 1)^2 / 4) (1 for a
/// single nucleus, 2 for a CH2 set, 4 for a methyl, 25 for a tert-butyl), this gives
/// <see cref="DisplacementEstimateHz"/> = J^2 g(n_A) g(n_B) / (2 |delta nu|): an estimate, not a bound, since higher
/// orders and the smaller total spins of the sets (which move less) are not counted.
/// </summary>
/// <param name="A">Index of one entry.</param>
/// <param name="B">Index of the other entry, in another cluster.</param>
/// <param name="CouplingHz">The coupling J, signed.</param>
/// <param name="SeparationHz">|nu_A - nu_B| at the system's field.</param>
/// <param name="DisplacementEstimateHz">Second-order estimate of how far the left-out flip-flop term would move a line, in Hz.</param>
public sealed record CutCoupling(int A, int B, double CouplingHz, double SeparationHz, double DisplacementEstimateHz)
{
    /// <summary>|J| / |delta nu|.</summary>
    public double Ratio => Math.Abs(CouplingHz) / SeparationHz;

    /// <summary>g(n) = floor((n + 1)^2 / 4): the largest |&lt;m + 1|F+|m&gt;|^2 over the total spins F of n equivalent spin-1/2 nuclei.</summary>
    public static int LadderSquareFactor(int n) => (n + 1) * (n + 1) / 4;
}

/// <summary>How a system is split for simulation.</summary>
/// <param name="Threshold">Couplings with |J| / |delta nu| above this join their nuclei into one cluster; null for no splitting.</param>
/// <param name="Cut">The couplings between observed nuclei of different clusters, treated to first order only (empty when exact).</param>
public sealed record ClusterPlan(IReadOnlyList<Cluster> Clusters, double? Threshold, IReadOnlyList<CutCoupling> Cut)
{
    public bool IsExact => Threshold is null;

    /// <summary>The largest |J| / |delta nu| that was treated to first order: the size of the splitting error, roughly.</summary>
    public double LargestCutRatio => Clusters.Select(c => c.LargestCutRatio).DefaultIfEmpty(0).Max();

    /// <summary>The cut coupling with the largest |J| / |delta nu|, or null when nothing was cut.</summary>
    public CutCoupling? StrongestCut => Cut.MaxBy(c => c.Ratio);

    /// <summary>
    /// Estimated largest line displacement from the cut couplings, in Hz, and the entry whose lines move most: per
    /// entry the sum of <see cref="CutCoupling.DisplacementEstimateHz"/> over its cut couplings (second-order level
    /// shifts add). (0, -1) when nothing was cut.
    /// </summary>
    public (double Hz, int Entry) LargestDisplacementEstimate()
    {
        var perEntry = new Dictionary<int, double>();
        foreach (var c in Cut)
        {
            perEntry[c.A] = perEntry.GetValueOrDefault(c.A) + c.DisplacementEstimateHz;
            perEntry[c.B] = perEntry.GetValueOrDefault(c.B) + c.DisplacementEstimateHz;
        }
        if (perEntry.Count == 0) return (0, -1);
        var worst = perEntry.MaxBy(kv => (kv.Value, -kv.Key));
        return (worst.Value, worst.Key);
    }
}

public static class ClusterPartition
{
    /// <summary>The whole system as one cluster: exact.</summary>
    public static ClusterPlan Whole(SpinSystem system) =>
        new([new Cluster(Enumerable.Range(0, system.Nuclei.Count).ToArray(), [], 0)], null, []);

    /// <summary>
    /// Splits the coupling network: two entries of the same isotope are in one cluster when |J| / |delta nu| exceeds
    /// <paramref name="threshold"/>, directly or through a chain. Heteronuclear couplings are J Iz Iz already and never
    /// join clusters, except that an unobserved group that is itself strongly coupled is merged into every cluster it
    /// touches, because its eigenstates are not Iz states. Clusters without an observed nucleus give no lines and are left out.
    /// </summary>
    public static ClusterPlan Plan(SpinSystem system, double threshold)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(threshold);
        var n = system.Nuclei.Count;
        var j = system.CouplingMatrixHz();
        var parent = Enumerable.Range(0, n).ToArray();
        int Find(int x) => parent[x] == x ? x : parent[x] = Find(parent[x]);
        void Union(int a, int b) => parent[Find(a)] = Find(b);

        for (var a = 0; a < n; a++)
            for (var b = a + 1; b < n; b++)
                if (IsStrong(system, j, a, b, threshold)) Union(a, b);

        // Strongly coupled unobserved groups are taken into the observed clusters they couple to.
        var groups = Enumerable.Range(0, n).GroupBy(Find).Select(g => g.ToArray()).ToList();
        foreach (var g in groups.Where(g => g.Length > 1 && system.Nuclei[g[0]].Isotope != system.Observed))
            for (var e = 0; e < n; e++)
                if (!g.Contains(e) && g.Any(x => j[x, e] != 0)) Union(g[0], e);

        var clusters = new List<Cluster>();
        var cuts = new List<CutCoupling>();
        for (var a = 0; a < n; a++)
            for (var b = a + 1; b < n; b++)
                if (j[a, b] != 0 && Find(a) != Find(b) && system.Nuclei[a].Isotope == system.Observed && system.Nuclei[b].Isotope == system.Observed)
                {
                    var separation = Math.Abs(system.FrequencyHz(a) - system.FrequencyHz(b));
                    var g = CutCoupling.LadderSquareFactor(system.Nuclei[a].Count) * CutCoupling.LadderSquareFactor(system.Nuclei[b].Count);
                    cuts.Add(new CutCoupling(a, b, j[a, b], separation, j[a, b] * j[a, b] * g / (2 * separation)));
                }
        foreach (var members in Enumerable.Range(0, n).GroupBy(Find).Select(g => g.ToArray()))
        {
            if (!members.Any(e => system.Nuclei[e].Isotope == system.Observed)) continue;
            var spectators = Enumerable.Range(0, n).Where(e => !members.Contains(e) && members.Any(m => j[m, e] != 0)).ToArray();
            var cut = 0.0;
            foreach (var m in members)
                foreach (var s in spectators)
                    if (j[m, s] != 0 && system.Nuclei[m].Isotope == system.Nuclei[s].Isotope)
                        cut = Math.Max(cut, Ratio(system, j, m, s));
            clusters.Add(new Cluster(members, spectators, cut));
        }
        return new ClusterPlan(clusters, threshold, cuts);
    }

    private static bool IsStrong(SpinSystem system, double[,] j, int a, int b, double threshold) =>
        j[a, b] != 0 && system.Nuclei[a].Isotope == system.Nuclei[b].Isotope && Ratio(system, j, a, b) > threshold;

    /// <summary>|J| / |delta nu|, infinite for equal shifts.</summary>
    public static double Ratio(SpinSystem system, double[,] j, int a, int b)
    {
        var dnu = Math.Abs(system.FrequencyHz(a) - system.FrequencyHz(b));
        return dnu == 0 ? double.PositiveInfinity : Math.Abs(j[a, b]) / dnu;
    }

    /// <summary>
    /// Spectator configurations of a cluster: for each distinct set of frequency shifts of the cluster's entries
    /// (sum over spectators of J x M_spectator), the number of spectator states that give it. Configurations that
    /// shift the cluster identically are computed once.
    /// </summary>
    internal static IReadOnlyList<(double[] ShiftHz, double Weight)> SpectatorConfigurations(SpinSystem system, Cluster cluster)
    {
        var j = system.CouplingMatrixHz();
        var configurations = new Dictionary<string, (double[] Shift, double Weight)>();
        var spectators = cluster.Spectators;
        var choice = new int[spectators.Length]; // number of beta spins in spectator set k: 0..count
        while (true)
        {
            var shift = new double[cluster.Entries.Length];
            double weight = 1;
            for (var k = 0; k < spectators.Length; k++)
            {
                var count = system.Nuclei[spectators[k]].Count;
                var m = count / 2.0 - choice[k];
                weight *= (double)CompositeSpins.Binomial(count, choice[k]);
                for (var c = 0; c < cluster.Entries.Length; c++) shift[c] += j[cluster.Entries[c], spectators[k]] * m;
            }
            var key = string.Join(",", shift.Select(s => Math.Round(s, 9).ToString("R", System.Globalization.CultureInfo.InvariantCulture)));
            configurations[key] = configurations.TryGetValue(key, out var existing) ? (existing.Shift, existing.Weight + weight) : (shift, weight);

            var i = spectators.Length - 1;
            while (i >= 0 && ++choice[i] > system.Nuclei[spectators[i]].Count) choice[i--] = 0;
            if (i < 0) break;
        }
        return configurations.Values.Select(v => (v.Shift, v.Weight)).ToList();
    }

    /// <summary>Above this many spectator states-by-M the configurations are counted, not enumerated.</summary>
    internal const double EnumeratedConfigurations = 100_000;

    /// <summary>
    /// How many times the cluster is diagonalised: its distinct spectator configurations. When the spectators have more
    /// than <see cref="EnumeratedConfigurations"/> combinations of M, their number (an upper bound) without enumerating them.
    /// </summary>
    public static long SpectatorConfigurationCount(SpinSystem system, Cluster cluster)
    {
        var raw = cluster.Spectators.Aggregate(1.0, (acc, e) => acc * (system.Nuclei[e].Count + 1));
        return raw > EnumeratedConfigurations ? (long)Math.Min(raw, long.MaxValue) : SpectatorConfigurations(system, cluster).Count;
    }

}
