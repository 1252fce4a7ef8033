using SpinSim.Core.LinearAlgebra;

namespace SpinSim.Core.Engine;

/// <summary>How the engine computes a line list.</summary>
/// <param name="Backend">Dense linear algebra; null picks <see cref="DenseBackends.Default"/>.</param>
/// <param name="RelativeIntensityFloor">Lines weaker than this fraction of the total intensity N 2^(N-1) are dropped (their sum is reported).</param>
/// <param name="MergeToleranceHz">Lines closer than this are merged into one (degenerate transitions).</param>
/// <param name="MemoryBudgetBytes">Systems whose estimated working memory exceeds this are refused.</param>
public sealed record EngineOptions(
    IDenseBackend? Backend = null,
    double RelativeIntensityFloor = 1e-10,
    double MergeToleranceHz = 1e-6,
    long MemoryBudgetBytes = 4L << 30)
{
    public static EngineOptions Default { get; } = new();

    public IDenseBackend ResolvedBackend => Backend ?? DenseBackends.Default;
}
