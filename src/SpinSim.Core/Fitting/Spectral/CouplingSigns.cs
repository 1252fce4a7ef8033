using SpinSim.Core.Engine;
using SpinSim.Core.Model;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>Couplings whose relative signs can change the spectrum: those touching one strongly coupled cluster.</summary>
/// <param name="Couplings">Indices into <see cref="SpinSystem.Couplings"/>.</param>
public sealed record SignGroup(IReadOnlyList<int> Couplings);

/// <summary>One sign pattern tried and the optimum a fit reached from it.</summary>
/// <param name="Signs">Sign (+1 or -1) of every coupling of the system at the optimum (0 for a zero coupling).</param>
/// <param name="ResidualSumOfSquares">The optimum's misfit.</param>
public sealed record SignOptimum(IReadOnlyList<int> Signs, double ResidualSumOfSquares);

/// <summary>What the spectrum says about the sign of one coupling relative to the others.</summary>
/// <param name="Coupling">Index into <see cref="SpinSystem.Couplings"/>.</param>
/// <param name="Determined">Whether its sign relative to at least one other coupling follows from the data.</param>
/// <param name="RelativeTo">The couplings its sign is determined relative to.</param>
/// <param name="MisfitRatio">RSS of the best optimum that reverses that relation, over the best RSS (NaN when none was tried).</param>
/// <param name="Probability">Probability of a ratio that large by noise alone (<see cref="MisfitComparison.Probability"/>).</param>
/// <param name="Reason">Why the sign is not determined, in words, when it is not.</param>
public sealed record SignVerdict(int Coupling, bool Determined, IReadOnlyList<int> RelativeTo, double MisfitRatio, double Probability, string? Reason);

/// <summary>
/// The sign-pattern search's bookkeeping: which couplings' relative signs can matter, which patterns to try, and what the
/// optima reached from them say. A coupling's sign can change the spectrum only through strong coupling: where every
/// pair is weakly coupled the spectrum is first order and depends on |J| alone; and reversing every coupling at once
/// never changes it (common practice, no source), so only relative signs are ever determined.
/// </summary>
public static class CouplingSigns
{
    /// <summary>Up to this many couplings in a group every relative pattern (2^(k-1)) is tried; beyond, single and pair flips.</summary>
    public const int ExhaustiveLimit = 6;

    /// <summary>A coupling smaller than this (Hz) has no sign worth stating.</summary>
    public const double NegligibleHz = 0.05;

    /// <summary>
    /// Groups of varied couplings whose relative signs the spectrum may determine: the couplings with at least one end in
    /// a strongly coupled cluster (|J / delta nu| above <paramref name="strongRatio"/>, the engine's own cut), merged
    /// where a coupling joins two clusters. A group of one coupling has no relative sign to find (one sign alone never
    /// shows) and gets no patterns.
    /// </summary>
    public static IReadOnlyList<SignGroup> Groups(SpinSystem system, IReadOnlySet<int> varied, double strongRatio = 0.05)
    {
        var plan = ClusterPartition.Plan(system, strongRatio);
        var clusterOf = new int[system.Nuclei.Count];
        Array.Fill(clusterOf, -1);
        var strong = plan.Clusters.Where(c => c.Entries.Length > 1).ToArray();
        for (var k = 0; k < strong.Length; k++)
            foreach (var e in strong[k].Entries) clusterOf[e] = k;

        // Union-find over clusters: a coupling touching two strong clusters joins them.
        var parent = Enumerable.Range(0, strong.Length).ToArray();
        int Find(int x) => parent[x] == x ? x : parent[x] = Find(parent[x]);
        var members = new List<(int Coupling, int Cluster)>();
        for (var c = 0; c < system.Couplings.Count; c++)
        {
            if (!varied.Contains(c)) continue;
            var (a, b) = (clusterOf[system.IndexOf(system.Couplings[c].A)], clusterOf[system.IndexOf(system.Couplings[c].B)]);
            if (a < 0 && b < 0) continue;
            if (a >= 0 && b >= 0) parent[Find(a)] = Find(b);
            members.Add((c, a >= 0 ? a : b));
        }
        return members.GroupBy(m => Find(m.Cluster)).Select(g => new SignGroup(g.Select(m => m.Coupling).Order().ToArray())).ToArray();
    }

    /// <summary>
    /// Every relative sign pattern of a group with at most <see cref="ExhaustiveLimit"/> couplings, as the set of its
    /// couplings to flip, the identity left out and the first coupling never flipped (flipping all gives the same
    /// spectrum): 2^(k-1) - 1 patterns. Larger groups get the single and pair flips, to be repeated from each improvement.
    /// </summary>
    public static IReadOnlyList<IReadOnlyList<int>> Patterns(SignGroup group)
    {
        var k = group.Couplings.Count;
        var patterns = new List<IReadOnlyList<int>>();
        if (k < 2) return patterns;
        if (k <= ExhaustiveLimit)
        {
            for (var mask = 1; mask < 1 << (k - 1); mask++)
                patterns.Add(Enumerable.Range(1, k - 1).Where(i => (mask >> (i - 1) & 1) == 1).Select(i => group.Couplings[i]).ToArray());
            return patterns;
        }
        for (var i = 0; i < k; i++) patterns.Add([group.Couplings[i]]);
        for (var i = 0; i < k; i++)
            for (var j = i + 1; j < k; j++) patterns.Add([group.Couplings[i], group.Couplings[j]]);
        return patterns;
    }

    /// <summary>
    /// What the optima say, coupling by coupling. The optima indistinguishable from the best (misfit ratio within
    /// Hamilton's test, <see cref="MisfitComparison"/>) form the accepted set; the sign of coupling c relative to coupling d
    /// is determined when s_c s_d is the same in every accepted optimum and some optimum tried has it reversed.
    /// </summary>
    public static IReadOnlyList<SignVerdict> Judge(SpinSystem fitted, IReadOnlySet<int> varied, IReadOnlyList<SignGroup> groups,
        IReadOnlyList<SignOptimum> optima, double effectivePoints, int freeParameters)
    {
        var best = optima.MinBy(o => o.ResidualSumOfSquares) ?? throw new ArgumentException("no optimum to judge");
        var floor = Math.Max(best.ResidualSumOfSquares, double.Epsilon);
        var critical = MisfitComparison.CriticalRatio(effectivePoints, freeParameters);
        var accepted = optima.Where(o => o.ResidualSumOfSquares / floor <= critical).ToArray();
        var verdicts = new List<SignVerdict>();
        for (var c = 0; c < fitted.Couplings.Count; c++)
        {
            if (!varied.Contains(c)) continue;
            var group = groups.FirstOrDefault(g => g.Couplings.Contains(c));
            if (Math.Abs(fitted.Couplings[c].J.Value) < NegligibleHz)
            {
                verdicts.Add(new SignVerdict(c, false, [], double.NaN, double.NaN, $"|J| is below {NegligibleHz} Hz"));
                continue;
            }
            if (group is null)
            {
                verdicts.Add(new SignVerdict(c, false, [], double.NaN, double.NaN,
                    "its nuclei are weakly coupled to everything they couple with, so the spectrum depends on |J| alone"));
                continue;
            }
            if (group.Couplings.Count == 1)
            {
                verdicts.Add(new SignVerdict(c, false, [], double.NaN, double.NaN,
                    "it is the only varied coupling of its strongly coupled group, and the overall sign of the couplings never shows"));
                continue;
            }
            var partners = group.Couplings.Where(d => d != c && Math.Abs(fitted.Couplings[d].J.Value) >= NegligibleHz).ToArray();
            bool Reversed(SignOptimum o, int d) => o.Signs[c] * o.Signs[d] != best.Signs[c] * best.Signs[d] && o.Signs[c] != 0 && o.Signs[d] != 0;
            var determined = partners.Where(d => accepted.All(o => !Reversed(o, d)) && optima.Any(o => Reversed(o, d))).ToArray();
            var relevant = determined.Length > 0 ? determined : partners;
            var rivals = optima.Where(o => relevant.Any(d => Reversed(o, d))).ToArray();
            var ratio = rivals.Length == 0 ? double.NaN : rivals.Min(o => o.ResidualSumOfSquares) / floor;
            var probability = double.IsNaN(ratio) ? double.NaN : MisfitComparison.Probability(ratio, effectivePoints, freeParameters);
            string? reason = null;
            if (determined.Length == 0)
                reason = rivals.Length == 0
                    ? "no pattern reversing it was tried"
                    : $"a fit with it reversed is as good (misfit ratio {ratio:0.0000}, probability {probability:0.00})";
            verdicts.Add(new SignVerdict(c, determined.Length > 0, determined, ratio, probability, reason));
        }
        return verdicts;
    }
}
