using SpinSim.Core.LinearAlgebra;

namespace SpinSim.Core.Engine;

/// <summary>How the engine computes a line list.</summary>
/// <param name="Backend">Dense linear algebra; null picks <see cref="DenseBackends.Default"/>.</param>
/// <param name="RelativeIntensityFloor">
/// Lines weaker than this fraction of the total intensity N 2^(N-1) are not listed one by one but pooled into bins of
/// <paramref name="PoolWidthHz"/>: one line per bin at the intensity-weighted mean frequency, carrying the summed
/// intensity and origin, so the sum rule, the first moment and the integrals stay exact. A weak line alone in its bin
/// keeps its exact frequency. The default 1e-6 is far below anything visible (a 1-proton line of a 40-proton
/// molecule split 8-fold holds 3e-3 of the total), and it keeps a fully coupled 14-spin cluster, whose tens of
/// millions of transitions mostly lie below it, to some 10^5 lines instead of tens of millions.
/// </param>
/// <param name="PoolWidthHz">
/// Width of the bins that pool the lines below the floor. A bin moves its lines by at most half of it and, since it
/// keeps their centroid, changes a trace of linewidth W only by about (width / W)^2 / 2 of their share: 2e-4 at the
/// default 0.01 Hz and 0.5 Hz lines.
/// </param>
/// <param name="PoolWeakLines">
/// Pool the lines below the floor (the default, which keeps the sum rule exact), or drop them: a fit that fades weak
/// lines out itself has no use for them and is faster without.
/// </param>
/// <param name="MergeToleranceHz">Lines closer than this are merged into one (degenerate transitions).</param>
/// <param name="MemoryBudgetBytes">Systems whose estimated working memory exceeds this are refused.</param>
/// <param name="TimeBudgetSeconds">
/// Systems whose estimated time (<see cref="ResourceEstimate"/>, with the backend that will run) exceeds this are refused
/// before any work, so that no input makes the engine run for hours; the default is one hour.
/// </param>
/// <param name="Splitting">Exact (one cluster), Split (weak-coupling clusters) or Auto (exact while cheap).</param>
/// <param name="WeakCouplingRatio">Couplings with |J| / |delta nu| above this keep their nuclei in one cluster.</param>
/// <param name="AutoExactLargestBlock">In Auto mode, systems whose largest exact block has at most this many states are simulated exactly.</param>
public sealed record EngineOptions(
    IDenseBackend? Backend = null,
    double RelativeIntensityFloor = 1e-6,
    double MergeToleranceHz = 1e-6,
    long MemoryBudgetBytes = 4L << 30,
    ClusterSplitting Splitting = ClusterSplitting.Auto,
    double WeakCouplingRatio = 0.05,
    int AutoExactLargestBlock = 256,
    double PoolWidthHz = 0.01,
    bool PoolWeakLines = true,
    double TimeBudgetSeconds = 3600)
{
    public static EngineOptions Default { get; } = new();

    public IDenseBackend ResolvedBackend => Backend ?? DenseBackends.Default;
}

/// <summary>Whether weakly coupled parts of a system are diagonalised separately.</summary>
public enum ClusterSplitting
{
    /// <summary>Exact when the largest block is small (see <see cref="EngineOptions.AutoExactLargestBlock"/>), split otherwise.</summary>
    Auto,

    /// <summary>The whole system as one cluster.</summary>
    Exact,

    /// <summary>Always split at <see cref="EngineOptions.WeakCouplingRatio"/>.</summary>
    Split,
}
