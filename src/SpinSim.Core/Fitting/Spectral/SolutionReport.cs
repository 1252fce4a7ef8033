namespace SpinSim.Core.Fitting.Spectral;

/// <summary>What the spectrum says about the sign of one coupling, relative to the others (see <see cref="CouplingSigns.Judge"/>).</summary>
/// <param name="Parameter">The coupling's parameter name (<c>j:A-B</c>).</param>
/// <param name="RelativeTo">Parameter names of the couplings its sign is determined relative to.</param>
/// <param name="MisfitRatio">RSS of the best fit with that relation reversed over the best RSS; NaN when none was tried.</param>
/// <param name="Probability">Probability of so large a ratio by noise alone (Hamilton's test, <see cref="MisfitComparison"/>).</param>
public sealed record CouplingSignReport(string Parameter, bool Determined, IReadOnlyList<string> RelativeTo, double MisfitRatio,
    double Probability, string? Reason);

/// <summary>One parameter that differs between the best fit and an alternative solution.</summary>
public sealed record ParameterDifference(string Name, string Unit, double Best, double Alternative);

/// <summary>
/// A distinct optimum whose misfit the data cannot tell from the best (<see cref="MisfitComparison"/>): the spectrum
/// allows both. <paramref name="Origin"/> says which start or pattern reached it.
/// </summary>
public sealed record AlternativeSolution(double MisfitRatio, double Probability, string Origin, IReadOnlyList<ParameterDifference> Differences);

/// <summary>The sign search's report on a fit: coupling signs, alternative solutions and how much was tried.</summary>
public sealed record SolutionSearch(int StartsTried, int SignPatternsTried, int SecondSolutionsTried, int DistinctOptima,
    double EffectivePoints, IReadOnlyList<CouplingSignReport> Signs, IReadOnlyList<AlternativeSolution> Alternatives);

/// <summary>Turns the optima of a fit and its sign search into the <see cref="SolutionSearch"/> report.</summary>
internal static class SolutionReport
{
    /// <summary>
    /// Optima whose misfit ratio at the thinned last stage exceeds 1 by at most this many times the critical excess of
    /// a test on that stage's points are polished and compared on all points; the rest are clearly worse.
    /// </summary>
    private const double PolishMargin = 3;

    public static SpectrumFitResult Attach(SpectrumFitResult result, SpectrumFitProblem problem, ParameterLayout layout,
        FitOptimum best, LeastSquaresResult polished, IReadOnlyList<FitOptimum> optima, SignSearch.Outcome search,
        Func<double[], double[], double> distanceHz, double sameToleranceHz, Func<double[], LeastSquaresResult> polish)
    {
        // Residual runs: each trace's fitted points split where regions or exclusions leave a gap.
        var runs = result.Traces.SelectMany(t => SpectrumBootstrap.Segments(t.Measured.ShiftPpm)
            .Select(seg => t.Residual[seg.Start..seg.End])).ToArray();
        var effective = MisfitComparison.EffectivePoints(runs);
        var p = layout.FreeCount;
        var critical = MisfitComparison.CriticalRatio(effective, p);

        // The optima's misfits are those of the last, thinned stage: a ratio there is noisier than on all points (fewer
        // of them), so an optimum near the best is polished on all points and compared there, and one clearly worse
        // keeps its thinned ratio.
        var thinnedCritical = MisfitComparison.CriticalRatio(Math.Min(effective, best.Result.Points), p);
        var freeOfCoupling = SignSearch.FreeOfCoupling(layout, problem.System.Couplings.Count);
        int[] Signs(double[] free) => freeOfCoupling.Select((f, c) =>
            Math.Sign(f >= 0 ? free[f] : problem.System.Couplings[c].J.Value)).ToArray();
        var bestFull = layout.Expand(polished.Parameters);
        var bestSigns = Signs(polished.Parameters);
        var compared = new List<Compared>();
        foreach (var o in optima.OrderBy(o => o.Cost))
        {
            var thinnedRatio = o.Cost / Math.Max(best.Cost, double.Epsilon);
            var signs = Signs(o.Free);
            var full = layout.Expand(o.Free);
            // The best itself, reached again, relabelled (A with B in AA'BB') or mirrored (every sign reversed) gives the
            // same spectrum: polishing it would only give the best's misfit again.
            var again = ReferenceEquals(o, best) || distanceHz(o.Free, best.Free) <= sameToleranceHz
                || (SameUpToSignsAndLabels(layout, bestFull, full) && (signs.SequenceEqual(bestSigns) || signs.SequenceEqual(bestSigns.Select(v => -v))));
            if (thinnedRatio > 1 + PolishMargin * (thinnedCritical - 1) || again)
            {
                compared.Add(new Compared(o, signs, thinnedRatio, null));
                continue;
            }
            // The same optimum reached twice (the same signs, values within the relabelling tolerances) is polished once.
            var twin = compared.FirstOrDefault(c => c.Polished is not null && c.Signs.SequenceEqual(signs)
                && SameUpToSignsAndLabels(layout, layout.Expand(c.Optimum.Free), full));
            var refined = twin?.Polished ?? polish(o.Free);
            compared.Add(new Compared(o, signs, refined.ResidualSumOfSquares / Math.Max(polished.ResidualSumOfSquares, double.Epsilon), refined));
        }

        var fittedSystem = layout.ApplySpin(problem.System, bestFull);
        var groups = search.Groups;
        var varied = Enumerable.Range(0, freeOfCoupling.Length).Where(c => freeOfCoupling[c] >= 0).ToHashSet();
        var signOptima = compared.Select(c => new SignOptimum(c.Signs, c.Ratio)).Append(new SignOptimum(bestSigns, 1)).ToArray();
        var verdicts = CouplingSigns.Judge(fittedSystem, varied, groups, signOptima, effective, p);
        string CouplingName(int c) => layout.Parameters.First(q => q.Kind == ParameterKind.JHz && q.Index == c).Name;
        var signReports = verdicts.Select(v => new CouplingSignReport(CouplingName(v.Coupling), v.Determined, v.RelativeTo.Select(CouplingName).ToArray(),
            v.MisfitRatio, v.Probability, v.Reason)).ToArray();

        // Distinct optima: one representative per cluster of optima closer than the joining tolerance. A refit stopped as
        // clearly worse (StopReason.AboveLimit) reached no optimum and is not counted.
        var distinct = new List<FitOptimum> { best };
        foreach (var o in optima.Where(o => o.Result.Reason != StopReason.AboveLimit).OrderBy(o => o.Cost))
            if (distinct.All(d => distanceHz(d.Free, o.Free) > sameToleranceHz)) distinct.Add(o);

        var alternatives = new List<(double[] Full, AlternativeSolution Solution)>();
        foreach (var c in compared)
        {
            if (c.Polished is not { } refined || !distinct.Contains(c.Optimum) || c.Ratio > critical) continue;
            var full = layout.Expand(refined.Parameters);
            if (distanceHz(refined.Parameters, polished.Parameters) <= sameToleranceHz) continue;
            if (SameUpToSignsAndLabels(layout, bestFull, full) || alternatives.Any(a => SameUpToSignsAndLabels(layout, a.Full, full))) continue;
            var differences = Enumerable.Range(0, layout.Parameters.Count)
                .Where(i => layout.Parameters[i].Kind is ParameterKind.ShiftPpm or ParameterKind.JHz && layout.FreeIndexOf(i) >= 0)
                // A coupling that differs only in sign is the sign report's business, not another solution's.
                .Where(i => (layout.Parameters[i].Kind == ParameterKind.JHz ? Math.Abs(Math.Abs(full[i]) - Math.Abs(bestFull[i])) : Math.Abs(full[i] - bestFull[i]))
                    > SignificantDifference(layout, i, polished))
                .Select(i => new ParameterDifference(layout.Parameters[i].Name, layout.Parameters[i].Unit, bestFull[i], full[i])).ToArray();
            if (differences.Length == 0) continue;
            var ratio = Math.Max(1, c.Ratio);
            alternatives.Add((full, new AlternativeSolution(ratio, MisfitComparison.Probability(ratio, effective, p), c.Optimum.Origin, differences)));
        }

        var warnings = result.Warnings.ToList();
        if (alternatives.Count > 0)
            warnings.Add($"{alternatives.Count + 1} distinct solutions fit this spectrum equally well (within Hamilton's 5 % test on " +
                         $"{effective:0} effective points): the values below are one of them; see the alternative solutions");
        return result with
        {
            Solutions = new SolutionSearch(result.Starts, search.Patterns, search.SecondSolutions, distinct.Count, effective, signReports,
                alternatives.Select(a => a.Solution).ToArray()),
            Warnings = warnings,
        };
    }

    /// <summary>An optimum, the signs of its couplings, its misfit over the best's (on all points when polished), and its polished point.</summary>
    private sealed record Compared(FitOptimum Optimum, int[] Signs, double Ratio, LeastSquaresResult? Polished);

    /// <summary>Three standard errors, and never less than a thousandth of a Hz (or its ppm).</summary>
    private static double SignificantDifference(ParameterLayout layout, int parameter, LeastSquaresResult polished)
    {
        var f = layout.FreeIndexOf(parameter);
        var se = f >= 0 ? polished.StandardErrors[f] : 0;
        var floor = layout.Parameters[parameter].Kind == ParameterKind.ShiftPpm ? 1e-6 : 1e-3;
        return Math.Max(floor, double.IsFinite(se) ? 3 * se : floor);
    }

    /// <summary>
    /// The same values under other labels (A with B in AA'BB') or with other coupling signs: the sorted shifts and the
    /// sorted |J| agree. Other labels are the same solution; other signs are what the sign report states, coupling by coupling.
    /// </summary>
    private static bool SameUpToSignsAndLabels(ParameterLayout layout, double[] a, double[] b)
    {
        bool SameSorted(ParameterKind kind, Func<double, double> value, double tolerance)
        {
            var x = Enumerable.Range(0, a.Length).Where(i => layout.Parameters[i].Kind == kind).Select(i => value(a[i])).Order().ToArray();
            var y = Enumerable.Range(0, b.Length).Where(i => layout.Parameters[i].Kind == kind).Select(i => value(b[i])).Order().ToArray();
            return x.Zip(y).All(t => Math.Abs(t.First - t.Second) <= tolerance);
        }
        return SameSorted(ParameterKind.ShiftPpm, v => v, 1e-4) && SameSorted(ParameterKind.JHz, Math.Abs, 0.05);
    }
}
