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
    Lineshape Shape);

/// <summary>How to search.</summary>
/// <param name="Starts">Number of starts: the given one plus random perturbations of shifts and couplings.</param>
/// <param name="ShiftJitterHz">Starts other than the first move each varied shift by up to this many Hz.</param>
/// <param name="CouplingJitterFraction">... and each varied coupling by up to this fraction of its value.</param>
/// <param name="Continuation">Fit broadened copies of data and model first, narrowing in stages down to none.</param>
/// <param name="JoinStarts">Let a start that comes onto another start's path during a broadened stage stop and share
/// its outcome (see <see cref="SpectrumFitter.JoinFraction"/>); off, every start runs every stage.</param>
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
    bool JoinStarts = true);

/// <summary>Progress of a fit: which start and stage, and the cost so far.</summary>
public sealed record FitProgress(int Start, int Stage, int Stages, double BroadeningHz, int Iteration, double ResidualSumOfSquares);

/// <summary>Fits shifts, couplings, widths, scale, baseline, offset and phase to one or more measured traces.</summary>
public static class SpectrumFitter
{
    /// <summary>Starts whose final cost is within this fraction of the best are counted as having reached it.</summary>
    public const double SameOptimumTolerance = 1e-4;

    public static SpectrumFitResult Fit(SpectrumFitProblem problem, SpectrumFitOptions? options = null)
    {
        options ??= new SpectrumFitOptions();
        // The engine may drop lines ten times weaker than those the model already fades out smoothly
        // (SpectralModel.NegligibleIntensity, relative to one nucleus); a higher floor would put steps into the
        // finite-difference derivatives as lines cross it.
        var floor = SpectralModel.NegligibleIntensity / 10 / Math.Max(1, problem.System.ObservedNucleusCount);
        var engine = (options.Engine ?? EngineOptions.Default) with { RelativeIntensityFloor = floor, PoolWeakLines = false };
        var prepared = problem.Data.Select(PreparedData.From).ToArray();
        var layout = new ParameterLayout(StartScales(problem, prepared, engine), problem.Ties);
        if (layout.FreeCount == 0) throw new InputException(null, null, "nothing to fit: every parameter is fixed", "Vary at least one parameter (vary = [\"shift:*\"] in the [fit] table)");
        var points = prepared.Sum(p => p.Count);
        if (points <= layout.FreeCount)
            throw new InputException(null, null, $"the fitted regions hold {points} points, not more than the {layout.FreeCount} free parameters", "Widen the regions (regions_ppm in the [fit] table)");

        var stages = Stages(problem, options);
        var starts = StartPoints(problem, layout, options);
        var (lower, upper) = layout.FreeBounds();
        // Shifts without bounds of their own stay within the fitted regions: outside them a nucleus has no data to
        // pull it back, and the scale would absorb its loss.
        var regionLow = problem.Data.Min(d => d.Regions.Min(r => r.Low));
        var regionHigh = problem.Data.Max(d => d.Regions.Max(r => r.High));
        for (var f = 0; f < layout.FreeCount; f++)
            if (layout.Parameters[layout.FreeRepresentatives[f]].Kind == ParameterKind.ShiftPpm)
                (lower[f], upper[f]) = (Math.Max(lower[f], regionLow), Math.Min(upper[f], regionHigh));
        for (var k = 0; k < starts.Count; k++)
        {
            if (options.Continuation) starts[k] = AlignCentroids(problem, layout, starts[k]);
            for (var f = 0; f < starts[k].Length; f++) starts[k][f] = Math.Clamp(starts[k][f], lower[f], upper[f]);
        }

        // Every start runs every stage on thinned points (>= 10 per linewidth at the last stage); the best is then
        // polished on all points, and that run gives the reported statistics. The stages run one after the other for
        // all starts: after each broadened stage, a start that has come within a small fraction of the stage's
        // linewidth of another start is on that start's path from there on (the narrower stages see no difference),
        // so it stops and shares the other's outcome.
        // The broadened, thinned data of each stage is the same for every start.
        var stageData = stages.Select(stage => prepared.Select((p, d) => p.Broadened(problem.Data[d].Trace, stage.BroadeningHz, stage.Stride)).ToArray()).ToArray();
        var current = starts.Select(x => (double[])x.Clone()).ToArray();
        var last = new LeastSquaresResult?[starts.Count];
        var follows = Enumerable.Range(0, starts.Count).ToArray();
        var running = Enumerable.Range(0, starts.Count).ToList();
        var widthHz = StartWidthHz(problem);
        for (var k = 0; k < stages.Count; k++)
        {
            if (options.Cancel.IsCancellationRequested && last[0] is not null) break;
            var stage = stages[k];
            Parallel.ForEach(running, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount }, s =>
            {
                last[s] = RunStage(problem, layout, stageData[k], engine, stage, current[s], lower, upper, options, s, k, stages.Count);
                current[s] = last[s]!.Parameters;
            });
            if (stage.BroadeningHz <= 0 || !options.JoinStarts) continue;
            var toleranceHz = JoinFraction * (stage.BroadeningHz + widthHz);
            var kept = new List<int>();
            foreach (var s in running)
            {
                var leader = kept.FirstOrDefault(t => SpinDistanceHz(problem, layout, current[s], current[t]) <= toleranceHz, -1);
                if (leader >= 0) follows[s] = leader; else kept.Add(s);
            }
            running = kept;
        }
        var outcomes = Enumerable.Range(0, starts.Count).Select(s =>
        {
            var leader = s;
            while (follows[leader] != leader) leader = follows[leader];
            return (Free: current[leader], Result: last[leader]!);
        }).ToArray();
        var joined = starts.Count - running.Count;

        var bestCost = outcomes.Min(o => o.Result.ResidualSumOfSquares);
        var atBest = outcomes.Where(o => o.Result.ResidualSumOfSquares <= bestCost * (1 + SameOptimumTolerance) + 1e-300).ToList();
        var reached = atBest.Count;
        // Symmetric systems have equivalent optima with nuclei relabelled (A with B in AA'BB'): keep the user's labels
        // by taking, among the starts at the best cost, the one whose shifts moved least from the given start.
        var best = atBest.OrderBy(o => ShiftDistance(layout, o.Free, starts[0])).First();
        var polish = options.Cancel.IsCancellationRequested
            ? best.Result
            : RunStage(problem, layout, prepared, engine, new Stage(0, 1, false), best.Free, lower, upper, options, -1, stages.Count, stages.Count + 1);
        var finalModel = new SpectralModel(problem.System, layout, prepared, problem.Shape, engine, 0);
        return SpectrumFitResult.Build(problem, layout, finalModel, polish.Parameters, polish, starts.Count, reached,
            options.Cancel.IsCancellationRequested) with { StartsJoined = joined };
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

    /// <summary>Largest difference in Hz (at the first trace's field) between two free vectors over the shifts and couplings.</summary>
    private static double SpinDistanceHz(SpectrumFitProblem problem, ParameterLayout layout, double[] a, double[] b)
    {
        var observed = problem.System.Observed;
        var largest = 0.0;
        for (var f = 0; f < layout.FreeCount; f++)
        {
            var p = layout.Parameters[layout.FreeRepresentatives[f]];
            var hz = p.Kind switch
            {
                // A shift in ppm is Hz at its own isotope's frequency: the observe frequency scaled by the ratio.
                ParameterKind.ShiftPpm => Math.Abs(a[f] - b[f]) * problem.Data[0].ObserveMHz
                    * problem.System.Nuclei[p.Index].Isotope.FrequencyRatioPercent / observed.FrequencyRatioPercent,
                ParameterKind.JHz => Math.Abs(a[f] - b[f]),
                _ => 0,
            };
            largest = Math.Max(largest, hz);
        }
        return largest;
    }

    private static double ShiftDistance(ParameterLayout layout, double[] a, double[] b) =>
        Enumerable.Range(0, layout.FreeCount).Where(f => layout.Parameters[layout.FreeRepresentatives[f]].Kind == ParameterKind.ShiftPpm)
            .Sum(f => Math.Abs(a[f] - b[f]));

    /// <summary>
    /// One continuation stage: added Lorentzian broadening, point stride, and whether couplings are held. While broadened,
    /// the linewidth is held and the scale kept within a factor of two of its start: with lines that miss the data the
    /// cheapest fit is otherwise a zero scale, from which no gradient leads back.
    /// </summary>
    private sealed record Stage(double BroadeningHz, int Stride, bool HoldCouplings);

    private static LeastSquaresResult RunStage(SpectrumFitProblem problem, ParameterLayout layout, PreparedData[] data, EngineOptions engine,
        Stage stage, double[] x, double[] lower, double[] upper, SpectrumFitOptions options, int start, int index, int count)
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
            // 1e-6 there changes nothing that the narrower stages see. The last stage and the polish converge fully.
            GradientTolerance = stage.BroadeningHz > 0 ? 1e-8 : 1e-10,
            StepTolerance = stage.BroadeningHz > 0 ? 1e-6 : 1e-10,
            FunctionTolerance = stage.BroadeningHz > 0 ? 1e-6 : 1e-12,
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

    private static List<double[]> StartPoints(SpectrumFitProblem problem, ParameterLayout layout, SpectrumFitOptions options)
    {
        var random = new Random(options.Seed);
        var first = layout.FreeStart();
        var (lower, upper) = layout.FreeBounds();
        var starts = new List<double[]> { first };
        var observeMHz = problem.Data[0].ObserveMHz;
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
                x[f] = Math.Clamp(x[f], lower[f], upper[f]);
            }
            starts.Add(x);
        }
        return starts;
    }

    /// <summary>Absolute difference steps: 1e-4 Hz for shifts, couplings, widths and offsets; relative for the rest.</summary>
    private static double[] Steps(ParameterLayout layout, double[] x, PreparedData[] data) =>
        Enumerable.Range(0, layout.FreeCount).Select(f =>
        {
            var p = layout.Parameters[layout.FreeRepresentatives[f]];
            return p.Kind switch
            {
                ParameterKind.ShiftPpm => 1e-4 / data[0].ObserveMHz,
                ParameterKind.JHz or ParameterKind.LinewidthHz or ParameterKind.OffsetHz => 1e-4,
                ParameterKind.PhaseDeg => 1e-3,
                _ => 1e-6 * Math.Max(1, Math.Abs(x[f])),
            };
        }).ToArray();

    /// <summary>Reports synchronously on the calling thread (Progress&lt;T&gt; would post to a context).</summary>
    private sealed class InlineProgress<T>(Action<T> report) : IProgress<T>
    {
        public void Report(T value) => report(value);
    }
}
