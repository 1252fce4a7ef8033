using SpinSim.Core.LinearAlgebra;

namespace SpinSim.Core.Engine;

/// <summary>How the engine computes a line list.</summary>
/// <param name="Backend">Dense linear algebra; null picks <see cref="DenseBackends.Default"/>.</param>
/// <param name="RelativeIntensityFloor">Lines weaker than this fraction of the total intensity N 2^(N-1) are dropped (their sum is reported).</param>
/// <param name="MergeToleranceHz">Lines closer than this are merged into one (degenerate transitions).</param>
/// <param name="MemoryBudgetBytes">Systems whose estimated working memory exceeds this are refused.</param>
/// <param name="Splitting">Exact (one cluster), Split (weak-coupling clusters) or Auto (exact while cheap).</param>
/// <param name="WeakCouplingRatio">Couplings with |J| / |delta nu| above this keep their nuclei in one cluster.</param>
/// <param name="AutoExactLargestBlock">In Auto mode, systems whose largest exact block has at most this many states are simulated exactly.</param>
public sealed record EngineOptions(
    IDenseBackend? Backend = null,
    double RelativeIntensityFloor = 1e-10,
    double MergeToleranceHz = 1e-6,
    long MemoryBudgetBytes = 4L << 30,
    ClusterSplitting Splitting = ClusterSplitting.Auto,
    double WeakCouplingRatio = 0.05,
    int AutoExactLargestBlock = 256)
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
