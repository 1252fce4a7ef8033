using SpinSim.Core.Model;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// A start for the fitter's stages, where it came from, and bounds of its own when it has them. A comparison refit (a sign
/// pattern, a second solution) only has to tell how its optimum compares with the best, whose cost at the last thinned
/// stage is <paramref name="CompareWith"/>: its last stage stops at a gain of 1e-5 per step, where a start stops at
/// 1e-6, and as soon as the local model shows that it cannot come within <see cref="SignSearch.ClearlyWorse"/> times
/// that cost.
/// </summary>
internal sealed record FitStart(double[] Free, string Origin, double[]? Lower = null, double[]? Upper = null, double? CompareWith = null);

/// <summary>An optimum reached by the fitter from one start, and where that start came from.</summary>
internal sealed record FitOptimum(double[] Free, LeastSquaresResult Result, string Origin)
{
    public double Cost => Result.ResidualSumOfSquares;
}

/// <summary>
/// The relative-sign search that follows a fit's first convergence: each group of couplings whose relative signs can
/// change the spectrum (<see cref="CouplingSigns.Groups"/>) is refitted from the best point with every relative pattern
/// of signs reversed (single and pair reversals repeated from each improvement in large groups), and, for every
/// strongly coupled pair with a common weakly coupled partner, from the ABX second solution (<see cref="AbxAlternative"/>),
/// which no sign change reaches. Every refit goes through the same stages as a normal start. A pattern's refit keeps the
/// pattern's signs for the group's couplings (one-sided bounds), so that its optimum is the best fit with those relative
/// signs: the misfit that the sign report compares, even where a free refit would run back across zero to the best signs.
/// </summary>
internal static class SignSearch
{
    /// <summary>Rounds of single and pair reversals in groups above <see cref="CouplingSigns.ExhaustiveLimit"/>.</summary>
    private const int MaxGreedyRounds = 4;

    /// <summary>
    /// A refit whose misfit cannot come within this factor of the best's is clearly worse, and stops: Hamilton's
    /// critical ratio (<see cref="MisfitComparison"/>) stays below 3 from 4 effective degrees of freedom on.
    /// </summary>
    public const double ClearlyWorse = 4;

    /// <summary>A held sign keeps a coupling at least this far (Hz) from zero, so that the optimum still has the sign.</summary>
    private const double HeldSignFloorHz = 1e-3;

    /// <summary>
    /// The search's outcome: every optimum reached, how many sign patterns and second solutions were tried, and the sign
    /// groups it searched (the report judges the same groups, so that a verdict never rests on patterns nobody tried).
    /// </summary>
    public sealed record Outcome(IReadOnlyList<FitOptimum> Optima, int Patterns, int SecondSolutions, IReadOnlyList<SignGroup> Groups);

    public static Outcome Run(SpinSystem start, ParameterLayout layout, FitOptimum best, (double[] Lower, double[] Upper) bounds,
        Func<IReadOnlyList<FitStart>, IReadOnlyList<FitOptimum>> refit, CancellationToken cancel)
    {
        var optima = new List<FitOptimum>();
        var patterns = 0;
        var current = best;
        var fitted = layout.ApplySpin(start, layout.Expand(current.Free));
        var freeOfCoupling = FreeOfCoupling(layout, start.Couplings.Count);
        var searchable = SearchableCouplings(layout, freeOfCoupling, bounds);
        var groups = CouplingSigns.Groups(fitted, searchable);
        // The second solutions of the best point go into the first batch of refits with the patterns, so that both cores
        // stay busy; when a pattern improves on the best, those of the improved point are refitted at the end.
        var second = SecondSolutions(start, layout, fitted, current, bounds).ToList();
        var secondTried = second.Count;
        foreach (var group in groups)
        {
            if (cancel.IsCancellationRequested) break;
            var free = group.Couplings.Select(c => freeOfCoupling[c]).Distinct().ToList();
            // A fixed or sign-held coupling in the group fixes the overall sign: then the first free one may flip too.
            var anchored = fitted.Couplings.Select((c, i) => (c, i))
                .Any(t => !searchable.Contains(t.i) && Math.Abs(t.c.J.Value) >= CouplingSigns.NegligibleHz && Touches(fitted, group, t.c));
            if (anchored) free.Insert(0, -1);
            var exhaustive = free.Count <= CouplingSigns.ExhaustiveLimit;
            var held = free.Where(f => f >= 0).ToArray();
            // A relative sign pattern refitted once (or the best's own) is not refitted again in a later greedy round.
            var tried = new HashSet<string> { PatternKey(current.Free, held, anchored) };
            for (var round = 0; round < (exhaustive ? 1 : MaxGreedyRounds); round++)
            {
                var flips = CouplingSigns.Patterns(new SignGroup(free)).Select(p => p.Where(f => f >= 0).ToArray()).Where(p => p.Length > 0)
                    .Select(p => (Reversed: p, Start: Flip(current.Free, p, bounds)))
                    .Where(t => tried.Add(PatternKey(t.Start, held, anchored))).ToList();
                if (flips.Count == 0) break;
                patterns += flips.Count;
                var batch = flips.Select(t => HoldingSigns(t.Start, held, bounds,
                    "signs reversed: " + string.Join(", ", t.Reversed.Select(f => Name(layout, f))), current.Cost)).Concat(second).ToList();
                second = [];
                var reached = refit(batch);
                optima.AddRange(reached);
                // An improvement within the fitter's same-optimum tolerance is the same optimum, not a new point to search from.
                var improved = reached.Where(o => o.Cost < current.Cost * (1 - SpectrumFitter.SameOptimumTolerance)).MinBy(o => o.Cost);
                if (improved is null) break;
                current = improved;
            }
        }

        if (!ReferenceEquals(current, best))
        {
            second = SecondSolutions(start, layout, layout.ApplySpin(start, layout.Expand(current.Free)), current, bounds).ToList();
            secondTried += second.Count;
        }
        if (second.Count > 0 && !cancel.IsCancellationRequested) optima.AddRange(refit(second));
        return new Outcome(optima, patterns, secondTried, groups);
    }

    /// <summary>The signs of <paramref name="held"/> at <paramref name="x"/>, up to the overall sign unless the group is anchored.</summary>
    private static string PatternKey(double[] x, int[] held, bool anchored)
    {
        var flip = !anchored && held.Length > 0 && x[held[0]] < 0;
        return string.Concat(held.Select(f => (x[f] < 0) ^ flip ? '-' : '+'));
    }

    private static bool Touches(SpinSystem system, SignGroup group, Coupling c) =>
        group.Couplings.Any(g => system.Couplings[g].A == c.A || system.Couplings[g].A == c.B || system.Couplings[g].B == c.A || system.Couplings[g].B == c.B);

    /// <summary>For each coupling of the system, the free value that holds it (-1 when it is fixed).</summary>
    internal static int[] FreeOfCoupling(ParameterLayout layout, int couplings)
    {
        var map = Enumerable.Repeat(-1, couplings).ToArray();
        for (var i = 0; i < layout.Parameters.Count; i++)
            if (layout.Parameters[i].Kind == ParameterKind.JHz) map[layout.Parameters[i].Index] = layout.FreeIndexOf(i);
        return map;
    }

    /// <summary>Couplings the search may reverse: free, and with bounds that allow both signs (a held sign is a one-sided bound).</summary>
    internal static HashSet<int> SearchableCouplings(ParameterLayout layout, int[] freeOfCoupling, (double[] Lower, double[] Upper) bounds) =>
        Enumerable.Range(0, freeOfCoupling.Length)
            .Where(c => freeOfCoupling[c] >= 0 && bounds.Lower[freeOfCoupling[c]] < 0 && bounds.Upper[freeOfCoupling[c]] > 0).ToHashSet();

    /// <summary>A start at <paramref name="x"/> whose couplings in <paramref name="group"/> keep the signs they have there.</summary>
    private static FitStart HoldingSigns(double[] x, int[] group, (double[] Lower, double[] Upper) bounds, string origin, double compareWith)
    {
        var (lower, upper) = ((double[])bounds.Lower.Clone(), (double[])bounds.Upper.Clone());
        foreach (var f in group)
        {
            if (x[f] >= 0) lower[f] = Math.Max(lower[f], HeldSignFloorHz);
            else upper[f] = Math.Min(upper[f], -HeldSignFloorHz);
            x[f] = Math.Clamp(x[f], lower[f], upper[f]);
        }
        return new FitStart(x, origin, lower, upper, compareWith);
    }

    private static double[] Flip(double[] free, IReadOnlyList<int> indices, (double[] Lower, double[] Upper) bounds)
    {
        var x = (double[])free.Clone();
        foreach (var f in indices) x[f] = Math.Clamp(-x[f], bounds.Lower[f], bounds.Upper[f]);
        return x;
    }

    private static string Name(ParameterLayout layout, int free) => layout.Parameters[layout.FreeRepresentatives[free]].Name;

    /// <summary>
    /// Starts at the ABX second solution of every strongly coupled pair (A, B) and common partner X, more weakly coupled
    /// to each of them than they are to each other, whose two shifts and two X couplings are free values of their own (a
    /// tie would make the exchange change other nuclei too).
    /// </summary>
    private static IEnumerable<FitStart> SecondSolutions(SpinSystem start, ParameterLayout layout, SpinSystem fitted,
        FitOptimum best, (double[] Lower, double[] Upper) bounds)
    {
        var shiftFree = new int[fitted.Nuclei.Count];
        Array.Fill(shiftFree, -1);
        for (var i = 0; i < layout.Parameters.Count; i++)
            if (layout.Parameters[i].Kind == ParameterKind.ShiftPpm) shiftFree[layout.Parameters[i].Index] = layout.FreeIndexOf(i);
        var couplingFree = FreeOfCoupling(layout, fitted.Couplings.Count);
        bool Alone(int f) => f >= 0 && layout.MembersOf(f).Count() == 1;
        var j = fitted.CouplingMatrixHz();
        var n = fitted.Nuclei.Count;
        for (var a = 0; a < n; a++)
            for (var b = a + 1; b < n; b++)
            {
                if (j[a, b] == 0 || fitted.Nuclei[a].Isotope != fitted.Nuclei[b].Isotope || fitted.Nuclei[a].Count != 1 || fitted.Nuclei[b].Count != 1) continue;
                var ab = Engine.ClusterPartition.Ratio(fitted, j, a, b);
                if (ab <= 0.05 || !Alone(shiftFree[a]) || !Alone(shiftFree[b])) continue;
                for (var x = 0; x < n; x++)
                {
                    if (x == a || x == b || j[a, x] == 0 || j[b, x] == 0) continue;
                    // X is the distant partner of an ABX (the closed form holds to first order in J/dnu_AX): more weakly
                    // coupled to A and to B than they are to each other. Otherwise the triple is an ABX with other labels.
                    if (Engine.ClusterPartition.Ratio(fitted, j, a, x) >= ab || Engine.ClusterPartition.Ratio(fitted, j, b, x) >= ab) continue;
                    var (ax, bx) = (CouplingIndex(fitted, a, x), CouplingIndex(fitted, b, x));
                    if (!Alone(couplingFree[ax]) || !Alone(couplingFree[bx])) continue;
                    var other = AbxAlternative.SecondSolution(fitted, fitted.Nuclei[a].Id, fitted.Nuclei[b].Id, fitted.Nuclei[x].Id);
                    if (other is null) continue;
                    var free = (double[])best.Free.Clone();
                    free[shiftFree[a]] = other.Nuclei[a].Shift.Value;
                    free[shiftFree[b]] = other.Nuclei[b].Shift.Value;
                    free[couplingFree[ax]] = other.Couplings[ax].J.Value;
                    free[couplingFree[bx]] = other.Couplings[bx].J.Value;
                    for (var f = 0; f < free.Length; f++) free[f] = Math.Clamp(free[f], bounds.Lower[f], bounds.Upper[f]);
                    yield return new FitStart(free, $"ABX second solution of {fitted.Nuclei[a].Id}, {fitted.Nuclei[b].Id} with {fitted.Nuclei[x].Id}", CompareWith: best.Cost);
                }
            }
    }

    private static int CouplingIndex(SpinSystem system, int a, int b)
    {
        var (ia, ib) = (system.Nuclei[a].Id, system.Nuclei[b].Id);
        for (var c = 0; c < system.Couplings.Count; c++)
            if ((system.Couplings[c].A == ia && system.Couplings[c].B == ib) || (system.Couplings[c].A == ib && system.Couplings[c].B == ia)) return c;
        return -1;
    }
}
