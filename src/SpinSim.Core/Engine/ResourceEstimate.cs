using SpinSim.Core.Errors;
using SpinSim.Core.Model;

namespace SpinSim.Core.Engine;

/// <summary>
/// What a spin system will cost before it is computed: the largest block, the working memory and a time
/// estimate from measured dense eigen-solver rates (see DEVELOPERS.md, benchmarks).
/// </summary>
public sealed record ResourceEstimate(int LargestBlock, long StateCount, double WorkingBytes, double NativeSeconds, double ManagedSeconds)
{
    // Seconds per n^3 for a symmetric eigen-decomposition with vectors, measured on a 2-core machine
    // (../shared/notes/stack.md: n = 924 takes 1.65 s managed and 0.12 s with OpenBLAS dsyevd).
    private const double ManagedSecondsPerCube = 1.65 / (924.0 * 924 * 924);
    private const double NativeSecondsPerCube = 0.12 / (924.0 * 924 * 924);

    public static ResourceEstimate For(SpinSystem system) => For(system, Enumerable.Range(0, system.Nuclei.Count).ToArray());

    /// <summary>Above this many combinations of total spins the time is bounded (combinations x the largest one) rather than summed.</summary>
    private const int SummedCombinations = 4096;

    /// <summary>The cost of diagonalising the entries <paramref name="members"/> of <paramref name="system"/> together.</summary>
    public static ResourceEstimate For(SpinSystem system, int[] members)
    {
        // Per combination the blocks are the multinomial slices of the product space; the largest combination is the one
        // where every set takes its largest total spin. Memory is set by that one, time by all of them: each combination
        // of total spins is a subspectrum of its own.
        var twiceF = members.Select(e => system.Nuclei[e].Count).ToArray();
        var isotopes = members.Select(e => system.Nuclei[e].Isotope).ToArray();
        var blockSizes = BlockSizes(twiceF, isotopes);
        var largest = blockSizes.Count == 0 ? 0 : blockSizes.Max();
        double squares = blockSizes.Sum(n => (double)n * n);
        // Eigenvectors of all blocks are kept. Each solve running at the same time (one per core) holds about
        // 2 n^2 of dsyevd workspace, and each block pair two n x n work arrays: 4 n^2 per core at the largest block.
        // Measured for a fully coupled 14-spin system on 2 cores: this gives 1.0 GiB, the peak working set was 1.1 GiB.
        var concurrent = Math.Min(Environment.ProcessorCount, blockSizes.Count);
        var bytes = 8 * (squares + 4.0 * concurrent * largest * largest);
        var states = twiceF.Aggregate(1.0, (acc, f) => acc * (f + 1));
        var work = WorkOverCombinations(twiceF, isotopes);
        return new ResourceEstimate(largest, (long)Math.Min(states, long.MaxValue), bytes,
            work.Seconds(NativeSecondsPerCube), work.Seconds(ManagedSecondsPerCube));
    }

    /// <summary>
    /// The work of one cluster summed over its combinations of total spins: n^3 of the eigen-decompositions, n^2 of the
    /// candidate transitions between neighbouring blocks, and a fixed cost per block and per subspectrum. The last three
    /// dominate a cluster of many small blocks (a large equivalent set among single nuclei), which the n^3 term alone
    /// would call free.
    /// </summary>
    private readonly record struct Work(double Cubes, double Squares, double Blocks, double Subspectra)
    {
        // Rough per-item costs, on the safe side, on the development machine: a split 40-proton molecule with a set of
        // 64 among its single nuclei (some 10^4 small blocks, 6 x 10^4 lines, most of them pooled) took about 0.2 s,
        // measured under heavy load and scaled; a fully coupled 14-spin cluster spends some seconds outside its eigen-solves.
        private const double SecondsPerTransition = 4e-7, SecondsPerBlock = 2e-5, SecondsPerSubspectrum = 1e-4;

        public double Seconds(double secondsPerCube) =>
            2 * Cubes * secondsPerCube + Squares * SecondsPerTransition + Blocks * SecondsPerBlock + Subspectra * SecondsPerSubspectrum;

        public static Work Of(List<int> sizes) =>
            new(sizes.Sum(n => (double)n * n * n), sizes.Sum(n => (double)n * n), sizes.Count, 1);

        public Work Times(double k) => new(Cubes * k, Squares * k, Blocks * k, Subspectra * k);

        public static Work operator +(Work a, Work b) => new(a.Cubes + b.Cubes, a.Squares + b.Squares, a.Blocks + b.Blocks, a.Subspectra + b.Subspectra);
    }

    /// <summary>
    /// <see cref="Work"/> over every combination of total spins (a set of k equivalent nuclei takes 2F = k, k - 2, ...),
    /// exact up to <see cref="SummedCombinations"/> combinations and bounded above by combinations x the largest beyond,
    /// so that a system with very many combinations is refused without being enumerated.
    /// </summary>
    private static Work WorkOverCombinations(int[] counts, Isotope[] isotopes)
    {
        var choices = counts.Select(c => c / 2 + 1).ToArray();
        var combinations = choices.Aggregate(1.0, (acc, c) => acc * c);
        if (combinations > SummedCombinations) return Work.Of(BlockSizes(counts, isotopes)).Times(combinations);
        var choice = new int[counts.Length];
        var total = new Work();
        while (true)
        {
            var twiceF = counts.Select((c, k) => c - 2 * choice[k]).ToArray();
            total += Work.Of(BlockSizes(twiceF, isotopes));
            var i = counts.Length - 1;
            while (i >= 0 && ++choice[i] == choices[i]) choice[i--] = 0;
            if (i < 0) return total;
        }
    }

    /// <summary>
    /// The cost of a cluster plan: every cluster is diagonalised once per distinct spectator configuration, so times
    /// add up over clusters and configurations; the memory is that of the largest cluster, since each cluster's
    /// eigenvectors are released when its lines are out.
    /// </summary>
    public static ResourceEstimate For(SpinSystem system, ClusterPlan plan)
    {
        if (plan.IsExact) return For(system);
        var parts = plan.Clusters.Select(c => (Estimate: For(system, c.Entries), Configurations: (double)ClusterPartition.SpectatorConfigurationCount(system, c))).ToList();
        if (parts.Count == 0) return new ResourceEstimate(0, 0, 0, 0, 0);
        return new ResourceEstimate(
            parts.Max(p => p.Estimate.LargestBlock),
            (long)Math.Min(parts.Sum(p => p.Estimate.StateCount * p.Configurations), long.MaxValue),
            parts.Max(p => p.Estimate.WorkingBytes),
            parts.Sum(p => p.Estimate.NativeSeconds * p.Configurations),
            parts.Sum(p => p.Estimate.ManagedSeconds * p.Configurations));
    }

    /// <summary>The estimated time with the backend that will run: native OpenBLAS or the managed solver.</summary>
    public double SecondsWith(LinearAlgebra.IDenseBackend backend) => backend is LinearAlgebra.OpenBlasBackend ? NativeSeconds : ManagedSeconds;

    /// <summary>Sizes of the blocks of fixed M per isotope for particles of spin twiceF/2.</summary>
    internal static List<int> BlockSizes(int[] twiceF, Isotope[] isotopes)
    {
        // Count states per (isotope, M) by convolution; blocks are products across isotopes.
        var perIsotope = new List<double[]>();
        foreach (var iso in isotopes.Distinct())
        {
            var counts = new double[] { 1 };
            for (var k = 0; k < twiceF.Length; k++)
            {
                if (isotopes[k] != iso) continue;
                var next = new double[counts.Length + twiceF[k]];
                for (var a = 0; a < counts.Length; a++)
                    for (var d = 0; d <= twiceF[k]; d++) next[a + d] += counts[a];
                counts = next;
            }
            perIsotope.Add(counts);
        }
        IEnumerable<double> sizes = [1.0];
        foreach (var counts in perIsotope) sizes = sizes.SelectMany(s => counts.Select(c => s * c)).ToList();
        return sizes.Select(s => (int)Math.Min(s, int.MaxValue)).ToList();
    }

    public string Describe() =>
        $"largest block {LargestBlock} states, about {WorkingBytes / (1 << 20):0.#} MiB of working memory, " +
        $"about {Seconds(NativeSeconds)} with native OpenBLAS or {Seconds(ManagedSeconds)} with the managed solver";

    private static string Seconds(double s) => s < 0.01 ? "< 0.01 s" : s < 120 ? $"{s:0.##} s" : $"{s / 60:0.#} min";
}

/// <summary>
/// The system is too large for the engine's memory or time budget: refused before any work, the message states the
/// size, the budget and what to do.
/// </summary>
public sealed class SystemTooLargeException(string problem, ResourceEstimate estimate) : InputException(null, null, problem,
    "Merge magnetically equivalent nuclei into one entry with a count (a methyl is one entry with count = 3), " +
    "or let SpinSim split weakly coupled parts (do not use --exact; lower the splitting threshold)")
{
    public ResourceEstimate Estimate { get; } = estimate;

    public static SystemTooLargeException ForMemory(ResourceEstimate estimate, long budgetBytes) => new(
        $"this spin system needs a block of {estimate.LargestBlock} states and about {estimate.WorkingBytes / (1L << 30):0.##} GiB of working memory, " +
        $"more than the budget of {budgetBytes / (double)(1L << 30):0.##} GiB", estimate);

    public static SystemTooLargeException ForTime(ResourceEstimate estimate, double seconds, double budgetSeconds) => new(
        $"this spin system would take about {Describe(seconds)} to simulate (largest block {estimate.LargestBlock} states), " +
        $"more than the budget of {Describe(budgetSeconds)}", estimate);

    private static string Describe(double s) => s < 120 ? $"{s:0.##} s" : s < 7200 ? $"{s / 60:0.#} min" : s < 1e6 ? $"{s / 3600:0.#} h" : $"{s:G3} s";
}
