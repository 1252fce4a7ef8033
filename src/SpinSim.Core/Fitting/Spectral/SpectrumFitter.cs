using SpinSim.Core.Errors;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>What to fit: the system (its values are the start), the traces, the parameters and which are tied.</summary>
public sealed record SpectrumFitProblem(
    SpinSystem System,
    IReadOnlyList<FitDataset> Data,
    IReadOnlyList<FitParameter> Parameters,
    IReadOnlyList<IReadOnlyList<string>> Ties,
    Lineshape Shape)
{
    /// <summary>What building the problem decided on the user's behalf (shifts held, ties added), in words.</summary>
    public IReadOnlyList<string> Notes { get; init; } = [];

    /// <summary>Declared symmetries: their partners are compared after the fit when they were not tied.</summary>
    public IReadOnlyList<MirrorSymmetry> Symmetries { get; init; } = [];

    /// <summary>The default window of shifts around their start (stated in the report).</summary>
    public double ShiftWindowPpm { get; init; } = FitSetup.DefaultShiftWindowPpm;

    /// <summary>Whether the declared symmetries were tied (false: their partners are compared after the fit).</summary>
    public bool SymmetriesTied { get; init; } = true;
}

/// <summary>How to search.</summary>
/// <param name="Starts">Number of starts: the given one plus random perturbations of shifts and couplings.</param>
/// <param name="ShiftJitterHz">Starts other than the first move each varied shift by up to this many Hz.</param>
/// <param name="CouplingJitterFraction">... and each varied coupling by up to this fraction of its value.</param>
/// <param name="Continuation">Fit broadened copies of data and model first, narrowing in stages down to none.</param>
/// <param name="JoinStarts">Let a start that comes onto another start's path during a broadened stage stop and share
/// its outcome (see <see cref="SpectrumFitter.JoinFraction"/>); off, every start runs every stage.</param>
/// <param name="SignSearch">After the first convergence, refit every relative sign pattern of the couplings whose signs
/// can change the spectrum, and report which relative signs the data determine (<see cref="Spectral.SignSearch"/>).</param>
public sealed record SpectrumFitOptions(
    int Starts = 8,
    double ShiftJitterHz = 10,
    double CouplingJitterFraction = 0.2,
    bool Continuation = true,
    int Seed = 1,
    int MaxIterationsPerStage = 300,
    IProgress<FitProgress>? Progress = null,
    CancellationToken Cancel = default,
    EngineOptions? Engine = null,
    bool JoinStarts = true,
    bool SignSearch = true);

/// <summary>Progress of a fit: which start and stage, and the cost so far.</summary>
public sealed record FitProgress(int Start, int Stage, int Stages, double BroadeningHz, int Iteration, double ResidualSumOfSquares);

/// <summary>Fits shifts, couplings, widths, scale, baseline, offset and phase to one or more measured traces.</summary>
public static class SpectrumFitter
{
    /// <summary>Starts whose final cost is within this fraction of the best are counted as having reached it.</summary>
    public const double SameOptimumTolerance = 1e-4;

    public static SpectrumFitResult Fit(SpectrumFitProblem problem, SpectrumFitOptions? options = null)
    {
        var search = new Search(problem, options ?? new SpectrumFitOptions());
        if (search.Layout.FreeCount == 0) return search.Overlay();
        var points = search.Prepared.Sum(p => p.Count);
        if (points <= search.Layout.FreeCount)
            throw new InputException(null, null, $"the fitted regions hold {points} points, not more than the {search.Layout.FreeCount} free parameters", "Widen the regions (regions_ppm in the [fit] table)");

        var starts = StartPoints(problem, search.Layout, search.Options).Select(search.Aligned).ToList();
        var (outcomes, joined) = search.RunStarts(starts.Select((x, k) => new FitStart(x, k == 0 ? "the given start" : $"start {k + 1}")).ToList());
        var bestCost = outcomes.Min(o => o.Cost);
        var atBest = AtBest(outcomes, bestCost);
        var best = PreferUserLabels(search.Layout, atBest, starts[0]);

        // The relative signs of couplings change a second-order spectrum, and a start keeps the signs it was given:
        // every relative pattern is refitted through the same stages, and the best point over all of them wins.
        var optima = outcomes.ToList();
        SignSearch.Outcome? signs = null;
        if (search.Options.SignSearch && !search.Options.Cancel.IsCancellationRequested)
        {
            signs = SignSearch.Run(problem.System, search.Layout, best, (search.Lower, search.Upper), list => search.RunStarts(list).Optima,
                search.Options.Cancel);
            optima.AddRange(signs.Optima);
            var overall = optima.Min(o => o.Cost);
            if (overall < best.Cost * (1 - SameOptimumTolerance))
                best = PreferUserLabels(search.Layout, AtBest(optima, overall), starts[0]);
        }
        var result = search.Finish(best.Free, best.Result, starts.Count, atBest.Count, joined, out var polished);
        if (signs is null || search.Options.Cancel.IsCancellationRequested) return result;
        return SolutionReport.Attach(result, problem, search.Layout, best, polished, optima, signs,
            (a, b) => SpinDistanceHz(problem, search.Layout, a, b), JoinFraction * StartWidthHz(problem), search.Polish);
    }

    /// <summary>The optima whose cost is within <see cref="SameOptimumTolerance"/> of <paramref name="bestCost"/>: the same optimum reached again.</summary>
    private static List<FitOptimum> AtBest(IEnumerable<FitOptimum> optima, double bestCost) =>
        optima.Where(o => o.Cost <= bestCost * (1 + SameOptimumTolerance) + 1e-300).ToList();

    /// <summary>
    /// Symmetric systems have equivalent optima with nuclei relabelled (A with B in AA'BB'), every system has its mirror
    /// with all couplings reversed, and some signs the spectrum does not decide (J(A,B) in the AB part of an ABX): keep
    /// the user's labels and signs by taking, among optima at the best cost, the one whose shifts moved least from the
    /// given start, then the one whose couplings keep most of its signs. Shift distances within
    /// <see cref="RelabelStepPpm"/> of the nearest count as equally near: a relabelling moves shifts by their
    /// differences, an undecided sign by far less.
    /// </summary>
    private static FitOptimum PreferUserLabels(ParameterLayout layout, IReadOnlyList<FitOptimum> atBest, double[] start)
    {
        var distances = atBest.Select(o => (Optimum: o, Ppm: ShiftDistance(layout, o.Free, start))).ToList();
        var nearest = distances.Min(t => t.Ppm);
        return distances.Where(t => t.Ppm <= nearest + RelabelStepPpm)
            .OrderBy(t => Enumerable.Range(0, layout.FreeCount).Count(f => layout.Parameters[layout.FreeRepresentatives[f]].Kind == ParameterKind.JHz
                && Math.Sign(t.Optimum.Free[f]) != Math.Sign(start[f])))
            .ThenBy(t => t.Ppm).First().Optimum;
    }

    /// <summary>
    /// One fit's fixed parts (prepared data, layout, bounds, continuation stages and their data) and the steps every
    /// start goes through: <see cref="RunStarts"/> takes any set of start points through the same stages as a normal
    /// fit, so a caller can refit from a point of its own (a flipped sign, a guess) exactly as from the given start.
    /// </summary>
    internal sealed class Search
    {
        public readonly SpectrumFitProblem Problem;
        public readonly SpectrumFitOptions Options;
        public readonly EngineOptions Engine;
        public readonly PreparedData[] Prepared;
        public readonly ParameterLayout Layout;
        public readonly double[] Lower, Upper;
        private readonly List<Stage> _stages;
        private readonly PreparedData[][] _stageData;

        /// <summary>The start as given (bounds applied, scale from the data): the point the result may not be worse than.</summary>
        public readonly double[] GivenStart;

        public Search(SpectrumFitProblem problem, SpectrumFitOptions options)
        {
            Problem = problem;
            Options = options;
            // The engine may drop lines ten times weaker than those the model already fades out smoothly
            // (SpectralModel.NegligibleIntensity, relative to one nucleus); a higher floor would put steps into the
            // finite-difference derivatives as lines cross it.
            var floor = SpectralModel.NegligibleIntensity / 10 / Math.Max(1, problem.System.ObservedNucleusCount);
            Engine = (options.Engine ?? EngineOptions.Default) with { RelativeIntensityFloor = floor, PoolWeakLines = false };
            Prepared = problem.Data.Select(PreparedData.From).ToArray();
            Layout = new ParameterLayout(StartScales(problem, Prepared, Engine), problem.Ties);
            (Lower, Upper) = Layout.FreeBounds();
            // Shifts also stay within the fitted regions: outside them a nucleus has no data to pull it back, and the
            // scale would absorb its loss.
            var regionLow = problem.Data.Min(d => d.Regions.Min(r => r.Low));
            var regionHigh = problem.Data.Max(d => d.Regions.Max(r => r.High));
            for (var f = 0; f < Layout.FreeCount; f++)
                if (Layout.Parameters[Layout.FreeRepresentatives[f]].Kind == ParameterKind.ShiftPpm)
                    (Lower[f], Upper[f]) = (Math.Max(Lower[f], Math.Min(regionLow, Layout.FreeStart()[f])), Math.Min(Upper[f], Math.Max(regionHigh, Layout.FreeStart()[f])));
            GivenStart = Layout.FreeStart();
            for (var f = 0; f < GivenStart.Length; f++) GivenStart[f] = Math.Clamp(GivenStart[f], Lower[f], Upper[f]);
            _stages = Stages(problem, options);
            _mirror = MirrorCouplings(problem, Layout, Lower, Upper);
            // The broadened, thinned data of each stage is the same for every start.
            _stageData = _stages.Select(stage => Prepared.Select((p, d) => p.Broadened(problem.Data[d].Trace, stage.BroadeningHz, stage.Stride)).ToArray()).ToArray();
        }

        /// <summary>
        /// Takes every start through every stage on thinned points (>= 10 per linewidth at the last stage). The stages
        /// run one after the other for all starts: after each broadened stage, a start that has come within a small
        /// fraction of the stage's linewidth of another start is on that start's path from there on (the narrower
        /// stages see no difference), so it stops and shares the other's outcome. The points are taken as they are
        /// (see <see cref="Aligned"/>). Returns each start's outcome.
        /// </summary>
        public (IReadOnlyList<FitOptimum> Optima, int Joined) RunStarts(IReadOnlyList<FitStart> starts)
        {
            var current = starts.Select(x => (double[])x.Free.Clone()).ToArray();
            var last = new LeastSquaresResult?[starts.Count];
            var follows = Enumerable.Range(0, starts.Count).ToArray();
            // Whether a start follows its leader's mirror image (every coupling reversed) rather than the leader itself.
            var mirrored = new bool[starts.Count];
            var running = Enumerable.Range(0, starts.Count).ToList();
            var widthHz = StartWidthHz(Problem);
            for (var k = 0; k < _stages.Count; k++)
            {
                if (Options.Cancel.IsCancellationRequested && last[0] is not null) break;
                var stage = _stages[k];
                Parallel.ForEach(running, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount }, s =>
                {
                    last[s] = RunStage(Problem, Layout, _stageData[k], Engine, stage, current[s], starts[s].Lower ?? Lower, starts[s].Upper ?? Upper,
                        Options, s, k, _stages.Count, starts[s].CompareWith);
                    current[s] = last[s]!.Parameters;
                });
                if (stage.BroadeningHz <= 0 || !Options.JoinStarts) continue;
                var toleranceHz = JoinFraction * (stage.BroadeningHz + widthHz);
                var kept = new List<int>();
                foreach (var s in running)
                {
                    // A start with bounds of its own (a held sign pattern) follows only a start with the same bounds. A
                    // start whose couplings all have the opposite signs of another's is on that start's mirror path:
                    // reversing every coupling leaves the spectrum as it is (common practice, no source).
                    var leader = kept.FirstOrDefault(t => SameBounds(starts[s], starts[t])
                        && SpinDistanceHz(Problem, Layout, current[s], current[t]) <= toleranceHz, -1);
                    if (leader < 0 && _mirror is not null && starts[s].Lower is null)
                    {
                        var image = Mirror(current[s]);
                        leader = kept.FirstOrDefault(t => starts[t].Lower is null && SpinDistanceHz(Problem, Layout, image, current[t]) <= toleranceHz, -1);
                        mirrored[s] = leader >= 0;
                    }
                    if (leader >= 0) follows[s] = leader; else kept.Add(s);
                }
                running = kept;
            }
            var optima = new List<FitOptimum>();
            for (var s = 0; s < starts.Count; s++)
            {
                var (leader, image) = (s, false);
                while (follows[leader] != leader) (image, leader) = (image ^ mirrored[leader], follows[leader]);
                if (last[leader] is not { } result) continue;
                optima.Add(image
                    ? new FitOptimum(Mirror(current[leader]), result with { Parameters = Mirror(result.Parameters) }, starts[s].Origin)
                    : new FitOptimum(current[leader], result, starts[s].Origin));
            }
            return (optima, starts.Count - running.Count);
        }

        /// <summary>
        /// The free couplings, when reversing them all is a symmetry of the fit: every coupling of the system is varied
        /// and each has bounds symmetric about zero. Null otherwise.
        /// </summary>
        private readonly int[]? _mirror;

        private static int[]? MirrorCouplings(SpectrumFitProblem problem, ParameterLayout layout, double[] lower, double[] upper)
        {
            var free = SignSearch.FreeOfCoupling(layout, problem.System.Couplings.Count);
            if (free.Length == 0 || free.Any(f => f < 0)) return null;
            var distinct = free.Distinct().ToArray();
            return distinct.All(f => lower[f] == -upper[f]) ? distinct : null;
        }

        /// <summary><paramref name="free"/> with every coupling reversed (<see cref="_mirror"/>).</summary>
        private double[] Mirror(double[] free)
        {
            var x = (double[])free.Clone();
            foreach (var f in _mirror!) x[f] = -x[f];
            return x;
        }

        private static bool SameBounds(FitStart a, FitStart b) =>
            (a.Lower ?? []).AsSpan().SequenceEqual(b.Lower ?? []) && (a.Upper ?? []).AsSpan().SequenceEqual(b.Upper ?? []);

        /// <summary>Polishes <paramref name="free"/> on all points (no broadening, every point), within the fit's bounds.</summary>
        public LeastSquaresResult Polish(double[] free) =>
            RunStage(Problem, Layout, Prepared, Engine, new Stage(0, 1, false, Polish: true), free, Lower, Upper, Options, -1, _stages.Count, _stages.Count + 1);

        /// <summary>
        /// A start point made ready for <see cref="RunStarts"/>: shifts aligned on the data's centroids (with
        /// continuation) and every value within its bounds.
        /// </summary>
        public double[] Aligned(double[] x)
        {
            var start = Options.Continuation ? AlignCentroids(Problem, Layout, x) : (double[])x.Clone();
            for (var f = 0; f < start.Length; f++) start[f] = Math.Clamp(start[f], Lower[f], Upper[f]);
            return start;
        }

        /// <summary>Refits from <paramref name="free"/> through the same stages as a normal start, and polishes: one call.</summary>
        public SpectrumFitResult Refit(double[] free)
        {
            var outcome = RunStarts([new FitStart(Aligned(free), "the given point")]).Optima[0];
            return Finish(outcome.Free, outcome.Result, 1, 1, 0, out _);
        }

        /// <summary>Sum of squared residuals of the model at <paramref name="free"/> over all fitted points.</summary>
        public double Cost(double[] free)
        {
            var model = new SpectralModel(Problem.System, Layout, Prepared, Problem.Shape, Engine, 0);
            var r = new double[model.ResidualCount];
            model.Residuals(free, r);
            return r.Sum(v => v * v);
        }

        /// <summary>
        /// Polishes <paramref name="free"/> on all points and builds the result. The result is never worse than the
        /// start as given: when the search ended above it, the start itself is polished (the minimiser accepts only
        /// steps that lower the cost) and that is the result, with a plain statement that the start was the best point.
        /// </summary>
        public SpectrumFitResult Finish(double[] free, LeastSquaresResult result, int starts, int reached, int joined, out LeastSquaresResult polished)
        {
            var stopped = Options.Cancel.IsCancellationRequested;
            var polish = stopped ? result : Polish(free);
            var startCost = Cost(GivenStart);
            var points = Prepared.Sum(p => p.Count);
            var searchCost = polish.ResidualSumOfSquares;
            var startWasBest = false;
            if (!(polish.ResidualSumOfSquares <= startCost))
            {
                // Stopped or not, the start is a point seen: a stopped fit still keeps the better of the two.
                var fromStart = stopped ? null : Polish(GivenStart);
                if (fromStart is not null && fromStart.ResidualSumOfSquares <= polish.ResidualSumOfSquares)
                    (polish, startWasBest, reached) = (fromStart, true, 1);
            }
            polished = polish;
            var finalModel = new SpectralModel(Problem.System, Layout, Prepared, Problem.Shape, Engine, 0);
            var built = SpectrumFitResult.Build(Problem, Layout, finalModel, polish.Parameters, polish, starts, reached, stopped) with
            {
                StartsJoined = joined,
                StartRms = Math.Sqrt(startCost / points),
                Setup = FitSetupRecord.From(Problem, Layout, Options),
            };
            return startWasBest ? built.SayingStartWasBest(Math.Sqrt(searchCost / points)) : built;
        }

        /// <summary>
        /// Nothing varies: the comparison of the simulation at the given values with the data (figure, rms, report), no
        /// minimisation.
        /// </summary>
        public SpectrumFitResult Overlay()
        {
            var model = new SpectralModel(Problem.System, Layout, Prepared, Problem.Shape, Engine, 0);
            var cost = Cost(GivenStart);
            var n = Prepared.Sum(p => p.Count);
            var result = new LeastSquaresResult
            {
                Parameters = [], StandardErrors = [], Covariance = new double[0, 0], Correlation = new double[0, 0],
                ResidualSumOfSquares = cost, DegreesOfFreedom = n, ResidualVariance = cost / Math.Max(1, n), Rank = 0,
                NullSpace = [], Undetermined = [], AtBound = [], Iterations = 0, ResidualEvaluations = 1, JacobianEvaluations = 0,
                Converged = true, Reason = StopReason.GradientTolerance,
                Message = "nothing was varied: the simulation at the given values compared with the data",
            };
            return SpectrumFitResult.Build(Problem, Layout, model, [], result, 0, 0, false) with
            {
                Overlay = true,
                StartRms = Math.Sqrt(cost / n),
                Setup = FitSetupRecord.From(Problem, Layout, Options),
            };
        }
    }

    /// <summary>
    /// Moves the shifts of the nuclei inside each fitted region of the first trace together, so that their count-weighted
    /// mean equals the intensity centroid of the data there. By the first-moment theorem (J. H. Van Vleck, Phys. Rev. 74,
    /// 1168, 1948) that mean is the centroid of the nuclei's lines whatever the couplings, so this removes a common error
    /// of the start before any line has to overlap the data.
    /// </summary>
    private static double[] AlignCentroids(SpectrumFitProblem problem, ParameterLayout layout, double[] free)
    {
        var x = (double[])free.Clone();
        var full = layout.Expand(x);
        var data = problem.Data[0];
        var t = data.Trace;
        foreach (var region in data.Regions)
        {
            var inside = Enumerable.Range(0, t.Count).Where(i => region.Contains(t.ShiftPpm[i]) && !data.Exclude.Any(e => e.Contains(t.ShiftPpm[i]))).ToArray();
            if (inside.Length < 3) continue;
            var baseline = inside.Select(i => t.Intensity[i]).Order().ElementAt(inside.Length / 2);
            double sumY = 0, sumYPpm = 0;
            foreach (var i in inside)
            {
                var y = t.Intensity[i] - baseline;
                sumY += y;
                sumYPpm += y * t.ShiftPpm[i];
            }
            if (!(sumY > 0)) continue;
            var shiftParams = Enumerable.Range(0, layout.Parameters.Count)
                .Where(i => layout.Parameters[i].Kind == ParameterKind.ShiftPpm && layout.FreeIndexOf(i) >= 0 && region.Contains(full[i])).ToArray();
            if (shiftParams.Length == 0) continue;
            var counts = shiftParams.Select(i => (double)problem.System.Nuclei[layout.Parameters[i].Index].Count).ToArray();
            var mean = shiftParams.Select((i, k) => counts[k] * full[i]).Sum() / counts.Sum();
            var move = sumYPpm / sumY - mean;
            foreach (var f in shiftParams.Select(layout.FreeIndexOf).Distinct()) x[f] += move;
        }
        return x;
    }

    /// <summary>
    /// A start stops once all its shifts and couplings lie within this fraction of the current stage's total linewidth
    /// (broadening plus line width) of another start's: minima of a cost broadened that much are further apart.
    /// </summary>
    internal const double JoinFraction = 0.01;

    /// <summary>Largest (or with <paramref name="sum"/>, summed) difference in Hz at the first trace's field between two free vectors over the shifts and couplings.</summary>
    private static double SpinDistanceHz(SpectrumFitProblem problem, ParameterLayout layout, double[] a, double[] b, bool sum = false)
    {
        var observed = problem.System.Observed;
        var largest = 0.0;
        for (var f = 0; f < layout.FreeCount; f++)
        {
            var p = layout.Parameters[layout.FreeRepresentatives[f]];
            // A shift in ppm is Hz at its own isotope's frequency: the observe frequency scaled by the ratio.
            var info = ParameterKindInfo.Of(p.Kind);
            var hz = !info.IsSpin ? 0 : Math.Abs(a[f] - b[f]) * info.HzPerUnit!(p.Kind == ParameterKind.ShiftPpm
                ? problem.Data[0].ObserveMHz * problem.System.Nuclei[p.Index].Isotope.FrequencyRatioPercent / observed.FrequencyRatioPercent
                : problem.Data[0].ObserveMHz);
            largest = sum ? largest + hz : Math.Max(largest, hz);
        }
        return largest;
    }

    /// <summary>Shift distances (summed over the free shifts) closer than this are the same for <see cref="PreferUserLabels"/>.</summary>
    private const double RelabelStepPpm = 1e-3;

    private static double ShiftDistance(ParameterLayout layout, double[] a, double[] b) =>
        Enumerable.Range(0, layout.FreeCount).Where(f => layout.Parameters[layout.FreeRepresentatives[f]].Kind == ParameterKind.ShiftPpm)
            .Sum(f => Math.Abs(a[f] - b[f]));

    /// <summary>
    /// One continuation stage: added Lorentzian broadening, point stride, whether couplings are held, and whether it is the
    /// polish (all points, converged fully). While broadened,
    /// the linewidth is held and the scale kept within a factor of two of its start: with lines that miss the data the
    /// cheapest fit is otherwise a zero scale, from which no gradient leads back.
    /// </summary>
    private sealed record Stage(double BroadeningHz, int Stride, bool HoldCouplings, bool Polish = false);

    private static LeastSquaresResult RunStage(SpectrumFitProblem problem, ParameterLayout layout, PreparedData[] data, EngineOptions engine,
        Stage stage, double[] x, double[] lower, double[] upper, SpectrumFitOptions options, int start, int index, int count, double? compareWith = null)
    {
        var model = new SpectralModel(problem.System, layout, data, problem.Shape, engine, stage.BroadeningHz) { Steps = Steps(layout, x, data) };
        var (lo, hi) = ((double[])lower.Clone(), (double[])upper.Clone());
        for (var f = 0; f < layout.FreeCount; f++)
        {
            var kind = layout.Parameters[layout.FreeRepresentatives[f]].Kind;
            if ((stage.HoldCouplings && kind == ParameterKind.JHz) || (stage.BroadeningHz > 0 && kind == ParameterKind.LinewidthHz))
                lo[f] = hi[f] = x[f];
            if (stage.BroadeningHz > 0 && kind == ParameterKind.Scale)
                (lo[f], hi[f]) = (Math.Max(lo[f], x[f] / 2), Math.Min(hi[f], x[f] * 2));
        }
        model.Held = lo.Select((l, f) => l == hi[f]).ToArray();
        var progress = options.Progress is null ? null : new InlineProgress<LeastSquaresProgress>(p =>
            options.Progress.Report(new FitProgress(start, index + 1, count, stage.BroadeningHz, p.Iteration, p.ResidualSumOfSquares)));
        return LevenbergMarquardt.Minimise(model, x, new LeastSquaresOptions
        {
            LowerBounds = lo,
            UpperBounds = hi,
            MaxIterations = options.MaxIterationsPerStage,
            // A broadened stage only has to bring the next one into its basin: a relative change of the cost below
            // 1e-6 there changes nothing that the narrower stages see. The last, thinned stage ranks the optima, which
            // count as the same within 1e-4 (SameOptimumTolerance), and hands the best to the polish; it stops once a
            // step gains less than 1e-6 of the cost (a bad optimum otherwise crawls there for dozens of steps), and a
            // comparison refit at 1e-5: an optimum near the best is polished on all points before it is judged
            // (SolutionReport), and one far from it needs no more digits. The polish converges fully.
            GradientTolerance = stage.BroadeningHz > 0 ? 1e-8 : 1e-10,
            StepTolerance = stage.BroadeningHz > 0 ? 1e-6 : 1e-10,
            FunctionTolerance = stage.Polish ? 1e-12 : stage.BroadeningHz == 0 && compareWith is not null ? 1e-5 : 1e-6,
            StopAboveCost = stage.BroadeningHz == 0 && compareWith is { } reference ? SignSearch.ClearlyWorse * reference : double.PositiveInfinity,
            Progress = progress,
            Cancellation = options.Cancel,
        });
    }

    /// <summary>
    /// Replaces the start of every varied scale by the least-squares scale of the starting model (projection of the data
    /// onto it), so that fits start at the right height whatever the units of the measured trace.
    /// </summary>
    private static IReadOnlyList<FitParameter> StartScales(SpectrumFitProblem problem, PreparedData[] prepared, EngineOptions engine)
    {
        var parameters = problem.Parameters.ToArray();
        var probe = parameters.Select(p => p.Kind == ParameterKind.Baseline ? p with { Start = 0 } : p).ToArray();
        var layout = new ParameterLayout(probe, []);
        var model = new SpectralModel(problem.System, layout, prepared, problem.Shape, engine, 0);
        for (var i = 0; i < parameters.Length; i++)
        {
            var p = parameters[i];
            if (p.Kind != ParameterKind.Scale || !p.Vary) continue;
            var full = probe.Select(q => q.Start).ToArray();
            var m = model.Model(full, p.Dataset);
            var y = prepared[p.Dataset].Y;
            // Areas, not a projection: a start whose lines miss the data's lines still gets the right height.
            double sumY = 0, sumM = 0;
            for (var k = 0; k < m.Length; k++) { sumY += y[k]; sumM += m[k]; }
            var scale = p.Start * (sumM > 0 && sumY > 0 ? sumY / sumM : 1);
            parameters[i] = p with { Start = Math.Clamp(scale, Math.Max(p.Lower, 1e-300), p.Upper) };
        }
        return parameters;
    }

    /// <summary>
    /// Continuation from broad to narrow lines: Lorentzian broadening of data and model from max(2 x shift jitter, max |J|)
    /// down by thirds while above 2 Hz, then none. Couplings are held while the broadening exceeds half the largest |J|
    /// (the blurred pattern tells little about them). Points are thinned to about <see cref="BroadenedPointsPerWidth"/> per broadened linewidth.
    /// </summary>
    /// <summary>
    /// Points kept per linewidth in a broadened stage: a Lorentzian sampled this densely is fitted as well as one
    /// sampled densely, and each stage only has to bring the next into its basin.
    /// </summary>
    private const double BroadenedPointsPerWidth = 8;

    private static List<Stage> Stages(SpectrumFitProblem problem, SpectrumFitOptions options)
    {
        var stages = new List<Stage>();
        var finestStep = problem.Data.Min(StepHz);
        var width = StartWidthHz(problem);
        var maxJ = problem.System.Couplings.Select(c => Math.Abs(c.J.Value)).DefaultIfEmpty(0).Max();
        if (options.Continuation)
            for (var w = Math.Max(2 * options.ShiftJitterHz, maxJ); w > 2.0; w /= 3)
                stages.Add(new Stage(w, Math.Max(1, (int)((w + width) / BroadenedPointsPerWidth / finestStep)), w > maxJ / 2));
        stages.Add(new Stage(0, Math.Max(1, (int)(width / 10 / finestStep)), false));
        return stages;
    }

    /// <summary>The narrowest starting linewidth of the fit (1 Hz when it has none): what stages and joining are measured against.</summary>
    private static double StartWidthHz(SpectrumFitProblem problem) =>
        problem.Parameters.Where(p => p.Kind == ParameterKind.LinewidthHz).Select(p => p.Start).DefaultIfEmpty(1).Min();

    private static double StepHz(FitDataset d)
    {
        var t = d.Trace;
        return Math.Abs(t.ShiftPpm[^1] - t.ShiftPpm[0]) * d.ObserveMHz / Math.Max(1, t.Count - 1);
    }

    /// <summary>
    /// The given start, then random perturbations of it: each varied shift moved by up to the shift jitter, each
    /// coupling scaled by up to the coupling jitter, and, with the sign search on, the couplings whose relative signs can
    /// change the spectrum reversed at random (each with probability one half).
    /// </summary>
    private static List<double[]> StartPoints(SpectrumFitProblem problem, ParameterLayout layout, SpectrumFitOptions options)
    {
        var random = new Random(options.Seed);
        var first = layout.FreeStart();
        var (lower, upper) = layout.FreeBounds();
        var starts = new List<double[]> { first };
        var observeMHz = problem.Data[0].ObserveMHz;
        var freeOfCoupling = SignSearch.FreeOfCoupling(layout, problem.System.Couplings.Count);
        var reversible = options.SignSearch
            ? CouplingSigns.Groups(problem.System, SignSearch.SearchableCouplings(layout, freeOfCoupling, (lower, upper)))
                .Where(g => g.Couplings.Count > 1).SelectMany(g => g.Couplings.Select(c => freeOfCoupling[c])).ToHashSet()
            : [];
        for (var s = 1; s < options.Starts; s++)
        {
            var x = (double[])first.Clone();
            for (var f = 0; f < x.Length; f++)
            {
                var p = layout.Parameters[layout.FreeRepresentatives[f]];
                x[f] = p.Kind switch
                {
                    ParameterKind.ShiftPpm => x[f] + (2 * random.NextDouble() - 1) * options.ShiftJitterHz / observeMHz,
                    ParameterKind.JHz => x[f] * (1 + (2 * random.NextDouble() - 1) * options.CouplingJitterFraction),
                    _ => x[f],
                };
                if (reversible.Contains(f) && random.NextDouble() < 0.5) x[f] = -x[f];
                x[f] = Math.Clamp(x[f], lower[f], upper[f]);
            }
            starts.Add(x);
        }
        return starts;
    }

    /// <summary>Absolute difference steps per free value, as each kind states them (<see cref="ParameterKindInfo.DifferenceStep"/>).</summary>
    private static double[] Steps(ParameterLayout layout, double[] x, PreparedData[] data) =>
        Enumerable.Range(0, layout.FreeCount)
            .Select(f => ParameterKindInfo.Of(layout.Parameters[layout.FreeRepresentatives[f]].Kind).DifferenceStep(x[f], data[0].ObserveMHz)).ToArray();

    /// <summary>Reports synchronously on the calling thread (Progress&lt;T&gt; would post to a context).</summary>
    private sealed class InlineProgress<T>(Action<T> report) : IProgress<T>
    {
        public void Report(T value) => report(value);
    }
}
