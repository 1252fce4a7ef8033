using SpinSim.Core.Model;

namespace SpinSim.Core.Engine;

/// <summary>
/// Turns a spin system into its exact list of observed transitions. Every magnetically equivalent set is reduced
/// to its total spins (<see cref="CompositeSpins"/>); the spectrum is the multiplicity-weighted sum over every
/// combination of total spins of the sets.
/// </summary>
public static class SpectrumEngine
{
    public static LineList Compute(SpinSystem system, EngineOptions? options = null, CancellationToken cancel = default)
    {
        options ??= EngineOptions.Default;
        return Compute(system, PlanFor(system, options), options, cancel);
    }

    /// <summary>The cluster plan that <see cref="Compute(SpinSystem, EngineOptions?, CancellationToken)"/> uses under these options.</summary>
    public static ClusterPlan PlanFor(SpinSystem system, EngineOptions options) => options.Splitting switch
    {
        ClusterSplitting.Exact => ClusterPartition.Whole(system),
        ClusterSplitting.Split => ClusterPartition.Plan(system, options.WeakCouplingRatio),
        _ => ResourceEstimate.For(system).LargestBlock <= options.AutoExactLargestBlock
            ? ClusterPartition.Whole(system)
            : ClusterPartition.Plan(system, options.WeakCouplingRatio),
    };

    /// <summary>
    /// The lines of <paramref name="system"/> with their derivatives by the given shifts and couplings
    /// (<see cref="LineList.Derivatives"/>), from one diagonalisation. Needs the whole system diagonalised as one (a split
    /// plan moves lines by first-order spectator shifts, which this does not differentiate) and weak-line pooling off.
    /// </summary>
    /// <exception cref="InvalidOperationException">The options split the system or pool weak lines.</exception>
    public static LineList ComputeWithDerivatives(SpinSystem system, EngineOptions options, IReadOnlyList<SpinParameter> parameters,
        CancellationToken cancel = default)
    {
        var plan = PlanFor(system, options);
        if (!plan.IsExact) throw new InvalidOperationException("line derivatives need the whole system diagonalised as one; this one is split");
        if (options.PoolWeakLines) throw new InvalidOperationException("line derivatives need weak-line pooling off");
        foreach (var p in parameters)
            if (p.EntryA < 0 || p.EntryA >= system.Nuclei.Count || p.EntryB >= system.Nuclei.Count || p.EntryA == p.EntryB)
                throw new ArgumentException($"no such shift or coupling: entries {p.EntryA}, {p.EntryB}", nameof(parameters));
        return Compute(system, plan, options, cancel, parameters);
    }

    public static LineList Compute(SpinSystem system, ClusterPlan plan, EngineOptions options, CancellationToken cancel = default) =>
        Compute(system, plan, options, cancel, null);

    private static LineList Compute(SpinSystem system, ClusterPlan plan, EngineOptions options, CancellationToken cancel,
        IReadOnlyList<SpinParameter>? parameters)
    {
        if (!(options.PoolWidthHz > 0) || !double.IsFinite(options.PoolWidthHz))
            throw new ArgumentOutOfRangeException(nameof(options), options.PoolWidthHz, "the pooling width must be positive and finite");
        var backend = options.ResolvedBackend;
        // Refused before any work: memory per cluster, time for the whole plan.
        foreach (var cluster in plan.Clusters)
        {
            var estimate = ResourceEstimate.For(system, cluster.Entries);
            if (estimate.WorkingBytes > options.MemoryBudgetBytes)
                throw SystemTooLargeException.ForMemory(estimate, options.MemoryBudgetBytes);
        }
        var whole = ResourceEstimate.For(system, plan);
        if (whole.SecondsWith(backend) > options.TimeBudgetSeconds)
            throw SystemTooLargeException.ForTime(whole, whole.SecondsWith(backend), options.TimeBudgetSeconds);

        var observeMHz = system.Observed.ObserveMHz(system.Field);
        var expectedTotal = ExpectedTotalIntensity(system);
        var floor = options.RelativeIntensityFloor * expectedTotal;
        var totalSpins = system.Nuclei.Sum(n => n.Count);

        var work = new List<(Combination Combination, double Weight)>();
        foreach (var cluster in plan.Clusters)
        {
            // Spins neither in the cluster nor coupled to it multiply every line of the cluster by their state count.
            var inert = totalSpins - cluster.Entries.Concat(cluster.Spectators).Sum(e => system.Nuclei[e].Count);
            foreach (var (shift, weight) in ClusterPartition.SpectatorConfigurations(system, cluster))
                foreach (var combination in Combinations(system, cluster.Entries, shift))
                    work.Add((combination, combination.Weight * weight * Math.Pow(2, inert)));
        }

        var raw = new RawLines[work.Count][];
        var pools = new LinePools(system.Nuclei.Count, options.PoolWidthHz);
        var sizes = new IReadOnlyList<int>[work.Count];
        var solvers = work.Select(w => new SubspectrumSolver(w.Combination.Particles, w.Combination.CouplingsHz, system.Nuclei.Count, backend)
            { PoolWeakLines = options.PoolWeakLines }).ToArray();
        // Many small subspectra are cheaper on one thread than handed between threads.
        var parallel = new ParallelOptions
        {
            CancellationToken = cancel,
            MaxDegreeOfParallelism = solvers.Sum(s => (long)s.StateCount) >= SubspectrumSolver.ParallelBlockSize * 64 ? Environment.ProcessorCount : 1,
        };
        Parallel.For(0, work.Count, parallel, k =>
        {
            var (_, weight) = work[k];
            var solver = solvers[k];
            sizes[k] = solver.BlockSizes();
            raw[k] = solver.Solve(weight, floor, pools, options.PoolWidthHz, cancel,
                parameters is null ? null : GeneratorsFor(work[k].Combination.Particles, parameters));
        });
        var largest = sizes.SelectMany(s => s).DefaultIfEmpty(0).Max();
        var blocks = sizes.Sum(s => s.Count);

        var chunks = raw.SelectMany(r => r).ToList();
        var (lines, origin, dIntensity, dMoment) = Merge(chunks, pools, system.Nuclei.Count, options.MergeToleranceHz, observeMHz, parameters?.Count ?? 0);
        var derivatives = parameters is null ? null : new LineDerivatives(parameters, dIntensity, dMoment);
        var pooled = pools.Count;
        var notes = plan.IsExact ? new List<string> { "exact: the whole system was diagonalised as one" } : new List<string>
        {
            $"split into {plan.Clusters.Count} cluster(s) at |J/dnu| > {plan.Threshold}; the largest coupling treated to first order has |J/dnu| = {plan.LargestCutRatio:0.###}" +
            $"; estimated largest line displacement {plan.LargestDisplacementEstimate().Hz:0.###} Hz",
        };
        if (pooled > 0)
            notes.Add($"{pools.LineCount} lines below {options.RelativeIntensityFloor:G3} of the total intensity were pooled into {pooled} bins " +
                      $"of {options.PoolWidthHz:G3} Hz, listed at their intensity-weighted mean frequency (a line alone in its bin keeps its own)");
        return new LineList(lines, origin, system.Nuclei.Count, observeMHz, expectedTotal, largest, blocks, backend.Name, notes)
            { PooledLines = pooled, Derivatives = derivatives };
    }

    /// <summary>dH/dθ of each parameter in one subspectrum's particles (each entry is at most one particle there).</summary>
    private static Generator[] GeneratorsFor(Particle[] particles, IReadOnlyList<SpinParameter> parameters)
    {
        var of = new Dictionary<int, int>();
        for (var p = 0; p < particles.Length; p++) of[particles[p].Entry] = p;
        return parameters.Select(s =>
        {
            if (!of.TryGetValue(s.EntryA, out var p)) return new Generator(-1, -1);
            if (s.IsShift) return new Generator(p, -1);
            return of.TryGetValue(s.EntryB, out var q) ? new Generator(p, q) : new Generator(-1, -1);
        }).ToArray();
    }

    /// <summary>Tr(F+ F-) = N 2^(N-1) for N observed spin-1/2 nuclei, times 2^M for M unobserved ones.</summary>
    public static double ExpectedTotalIntensity(SpinSystem system)
    {
        var observed = system.ObservedNucleusCount;
        var all = system.Nuclei.Sum(n => n.Count);
        return observed * Math.Pow(2, all - 1);
    }

    internal sealed record Combination(Particle[] Particles, double[,] CouplingsHz, double Weight);

    /// <summary>
    /// Every combination of total spins of the equivalent sets among <paramref name="members"/>, with its multiplicity
    /// as weight; <paramref name="shiftHz"/> adds a spectator shift to each member's frequency.
    /// </summary>
    internal static IEnumerable<Combination> Combinations(SpinSystem system, int[] members, double[] shiftHz)
    {
        var entries = members.Length;
        var groups = system.Nuclei.Select(n => n.Isotope).Distinct().ToList();
        var j = system.CouplingMatrixHz();
        var options = members.Select(e => CompositeSpins.Decompose(system.Nuclei[e].Count)).ToArray();
        var choice = new int[entries];
        while (true)
        {
            var particles = new List<Particle>();
            var index = new List<int>();
            double weight = 1;
            for (var c = 0; c < entries; c++)
            {
                var spin = options[c][choice[c]];
                weight *= spin.Weight;
                if (spin.TwiceF == 0) continue; // a total spin of 0 neither flips nor shifts anything
                var e = members[c];
                var n = system.Nuclei[e];
                particles.Add(new Particle(e, spin.TwiceF, groups.IndexOf(n.Isotope), system.FrequencyHz(e) + shiftHz[c], n.Isotope == system.Observed));
                index.Add(e);
            }
            var couplings = new double[particles.Count, particles.Count];
            for (var p = 0; p < particles.Count; p++)
                for (var q = 0; q < particles.Count; q++)
                    couplings[p, q] = p == q ? 0 : j[index[p], index[q]];
            yield return new Combination(particles.ToArray(), couplings, weight);

            var k = entries - 1;
            while (k >= 0 && ++choice[k] == options[k].Count) choice[k--] = 0;
            if (k < 0) yield break;
        }
    }

    /// <summary>
    /// Sorts all raw lines by frequency and merges runs closer than <paramref name="toleranceHz"/> into one line at their
    /// intensity-weighted mean frequency, with intensity-weighted origin; the pools of weak lines (one line per bin) are
    /// listed among them by frequency. With <paramref name="derivatives"/> &gt; 0 the raw lines carry that many derivatives
    /// each, merged alongside (pools carry none, so there must be none then): for a run of merged lines I = sum I_k and
    /// I ν = sum I_k ν_k, so dI = sum dI_k and I dν = sum (dI_k ν_k + I_k dν_k) - ν dI.
    /// </summary>
    internal static (Line[] Lines, double[] Origin, double[] DIntensity, double[] DMoment) Merge(IReadOnlyList<RawLines> chunks, LinePools pools,
        int entryCount, double toleranceHz, double observeMHz, int derivatives = 0)
    {
        var (lines, origin, dIntensity, dMoment) = MergeExact(chunks, entryCount, toleranceHz, observeMHz, derivatives);
        if (pools.Count == 0) return (lines, origin, dIntensity, dMoment);
        if (derivatives > 0) throw new InvalidOperationException("pooled weak lines have no derivatives");
        var (weak, weakOrigin) = pools.ToLines(observeMHz);

        // Both lists are sorted by frequency: interleave them.
        var allLines = new Line[lines.Length + weak.Length];
        var allOrigin = new double[(long)allLines.Length * entryCount];
        int i = 0, j = 0;
        for (var k = 0; k < allLines.Length; k++)
        {
            var takeExact = j == weak.Length || (i < lines.Length && lines[i].FrequencyHz <= weak[j].FrequencyHz);
            var (from, fromOrigin, index) = takeExact ? (lines, origin, i++) : (weak, weakOrigin, j++);
            allLines[k] = from[index];
            Array.Copy(fromOrigin, (long)index * entryCount, allOrigin, (long)k * entryCount, entryCount);
        }
        return (allLines, allOrigin, [], []);
    }

    private static (Line[] Lines, double[] Origin, double[] DIntensity, double[] DMoment) MergeExact(IReadOnlyList<RawLines> chunks, int entryCount,
        double toleranceHz, double observeMHz, int derivatives)
    {
        var count = chunks.Sum(c => c.Count);
        var frequency = new double[count];
        var source = new long[count]; // chunk << 32 | index in the chunk
        var at = 0;
        for (var c = 0; c < chunks.Count; c++)
        {
            Array.Copy(chunks[c].FrequencyHz, 0, frequency, at, chunks[c].Count);
            for (var k = 0; k < chunks[c].Count; k++) source[at + k] = ((long)c << 32) | (uint)k;
            at += chunks[c].Count;
        }
        Array.Sort(frequency, source);

        // Groups of coincident lines, counted first so that every output is allocated once at its size.
        var groups = count == 0 ? 0 : 1;
        for (var i = 1; i < count; i++)
            if (frequency[i] - frequency[i - 1] > toleranceHz) groups++;
        var lines = new Line[groups];
        var origin = new double[(long)groups * entryCount];
        var dIntensity = new double[(long)groups * derivatives];
        var dMoment = new double[(long)groups * derivatives];
        var sumDI = new double[derivatives];
        var sumDM = new double[derivatives];
        for (int i = 0, g = 0; i < count; g++)
        {
            double sumI = 0, sumF = 0;
            var row = origin.AsSpan((int)((long)g * entryCount), entryCount);
            Array.Clear(sumDI);
            Array.Clear(sumDM);
            var first = i;
            do
            {
                var chunk = chunks[(int)(source[i] >> 32)];
                var k = (int)(source[i] & 0xffffffff);
                var intensity = chunk.Intensity[k];
                sumI += intensity;
                sumF += intensity * frequency[i];
                chunk.AddOrigin(k, intensity, row);
                for (var p = 0; p < derivatives; p++)
                {
                    var di = chunk.DIntensity[(long)k * derivatives + p];
                    sumDI[p] += di;
                    sumDM[p] += di * frequency[i] + chunk.DMoment[(long)k * derivatives + p];
                }
                i++;
            } while (i < count && frequency[i] - frequency[i - 1] <= toleranceHz);
            var f = i - first == 1 ? frequency[first] : sumF / sumI;
            lines[g] = new Line(f, f / observeMHz, sumI);
            for (var e = 0; e < entryCount; e++) row[e] /= sumI;
            for (var p = 0; p < derivatives; p++)
            {
                dIntensity[(long)g * derivatives + p] = sumDI[p];
                dMoment[(long)g * derivatives + p] = sumDM[p] - f * sumDI[p];
            }
        }
        return (lines, origin, dIntensity, dMoment);
    }
}
