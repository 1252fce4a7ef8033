using SpinSim.Core.Engine;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Tests.LinearAlgebra;

/// <summary>
/// A fact that needs the native OpenBLAS library. Skipped, with the reason, where libopenblas.so.0 is missing, like the
/// PDF check without poppler: SpinSim runs without it (the managed solver takes over), so a machine without it is not
/// broken. CI installs it (.ci/run), so there the comparison always runs.
/// </summary>
public sealed class NativeBackendFactAttribute : FactAttribute
{
    public NativeBackendFactAttribute()
    {
        if (OpenBlasBackend.TryLoad() is null)
            Skip = "libopenblas.so.0 not found or failed its self-test: install libopenblas0-pthread to compare the native and managed back-ends";
    }
}

public class BackendAgreementTests
{
    /// <summary>
    /// Eight strongly coupled protons with unequal shifts and couplings (invented values), so that no two lines are
    /// degenerate and the blocks (up to 70 states) are large enough for LAPACK dsyevd rather than the managed small-block path.
    /// </summary>
    private static SpinSystem EightSpins() => SpinSystem.Create(new FieldMHz(60),
        Enumerable.Range(0, 8).Select(i => new Nucleus($"H{i}", 2.0 + 0.037 * i + 0.0011 * i * i)).ToArray(),
        [.. from a in Enumerable.Range(0, 8) from b in Enumerable.Range(a + 1, 7 - a) select new Coupling($"H{a}", $"H{b}", 1.3 + 0.91 * a + 0.47 * b - 0.05 * a * b)]);

    [NativeBackendFact]
    public void Native_and_managed_back_ends_give_the_same_lines()
    {
        var system = EightSpins();
        var options = EngineOptions.Default with { Splitting = ClusterSplitting.Exact };
        var native = SpectrumEngine.Compute(system, options with { Backend = OpenBlasBackend.TryLoad() });
        var managed = SpectrumEngine.Compute(system, options with { Backend = ManagedBackend.Instance });
        Assert.True(native.LargestBlock > 32, $"largest block {native.LargestBlock}: too small to reach LAPACK");
        Assert.StartsWith("native", native.Backend);
        Assert.StartsWith("managed", managed.Backend);

        // Exact in both: the same eigenproblems, solved by two implementations, agree to rounding.
        Assert.Equal(managed.Lines.Count, native.Lines.Count);
        var tallest = managed.Lines.Max(l => l.Intensity);
        for (var i = 0; i < native.Lines.Count; i++)
        {
            Assert.Equal(managed.Lines[i].FrequencyHz, native.Lines[i].FrequencyHz, 1e-8);
            Assert.Equal(managed.Lines[i].Intensity, native.Lines[i].Intensity, 1e-9 * tallest);
        }
        Assert.Equal(managed.TotalIntensity, native.TotalIntensity, 1e-9 * managed.TotalIntensity);
    }
}
