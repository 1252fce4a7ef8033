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

    /// <summary>The cost of diagonalising the entries <paramref name="members"/> of <paramref name="system"/> together.</summary>
    public static ResourceEstimate For(SpinSystem system, int[] members)
    {
        // Per combination the blocks are the multinomial slices of the product space; the largest combination
        // is the one where every set takes its largest total spin, and it dominates the cost.
        var twiceF = members.Select(e => system.Nuclei[e].Count).ToArray();
        var isotopes = members.Select(e => system.Nuclei[e].Isotope).ToArray();
        var blockSizes = BlockSizes(twiceF, isotopes);
        var largest = blockSizes.Count == 0 ? 0 : blockSizes.Max();
        double cubes = blockSizes.Sum(n => (double)n * n * n);
        double squares = blockSizes.Sum(n => (double)n * n);
        // Eigenvectors of all blocks are kept. Each solve running at the same time (one per core) holds about
        // 2 n^2 of dsyevd workspace, and each block pair two n x n work arrays: 4 n^2 per core at the largest block.
        // Measured for a fully coupled 14-spin system on 2 cores: this gives 1.0 GiB, the peak working set was 1.1 GiB.
        var concurrent = Math.Min(Environment.ProcessorCount, blockSizes.Count);
        var bytes = 8 * (squares + 4.0 * concurrent * largest * largest);
        var states = twiceF.Aggregate(1.0, (acc, f) => acc * (f + 1));
        // The smaller total-spin combinations add roughly a geometric tail; a factor 1.5 covers it.
        return new ResourceEstimate(largest, (long)Math.Min(states, long.MaxValue), bytes,
            1.5 * 2 * cubes * NativeSecondsPerCube, 1.5 * 2 * cubes * ManagedSecondsPerCube);
    }

    /// <summary>
    /// The cost of a cluster plan: every cluster is diagonalised once per distinct spectator configuration, so times
    /// add up over clusters and configurations; the memory is that of the largest cluster, since each cluster's
    /// eigenvectors are released when its lines are out.
    /// </summary>
    public static ResourceEstimate For(SpinSystem system, ClusterPlan plan)
    {
        if (plan.IsExact) return For(system);
        var parts = plan.Clusters.Select(c => (Estimate: For(system, c.Entries), Configurations: ClusterPartition.SpectatorConfigurations(system, c).Count)).ToList();
        if (parts.Count == 0) return new ResourceEstimate(0, 0, 0, 0, 0);
        return new ResourceEstimate(
            parts.Max(p => p.Estimate.LargestBlock),
            parts.Sum(p => p.Estimate.StateCount * p.Configurations),
            parts.Max(p => p.Estimate.WorkingBytes),
            parts.Sum(p => p.Estimate.NativeSeconds * p.Configurations),
            parts.Sum(p => p.Estimate.ManagedSeconds * p.Configurations));
    }

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

/// <summary>The system is too large for the memory budget; the message states the size and what to do.</summary>
public sealed class SystemTooLargeException(ResourceEstimate estimate, long budgetBytes) : InputException(null, null,
    $"this spin system needs a block of {estimate.LargestBlock} states and about {estimate.WorkingBytes / (1L << 30):0.##} GiB of working memory, " +
    $"more than the budget of {budgetBytes / (double)(1L << 30):0.##} GiB",
    "Merge magnetically equivalent nuclei into one entry with a count " +
    "(a methyl is one entry with count = 3), or let SpinSim split weakly coupled parts (do not use --exact; lower the splitting threshold)")
{
    public ResourceEstimate Estimate { get; } = estimate;
}
