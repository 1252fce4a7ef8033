using BenchmarkDotNet.Attributes;
using SpinSim.Core.Engine;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Benchmarks;

/// <summary>Transition lists of fully coupled systems (every pair coupled, all shifts within 0.3 ppm at 400 MHz).</summary>
[MemoryDiagnoser]
public class EngineBenchmarks
{
    [Params(6, 8, 10, 12)]
    public int Spins { get; set; }

    [Params("native", "managed")]
    public string Backend { get; set; } = "native";

    private SpinSystem _system = null!;
    private EngineOptions _options = null!;

    [GlobalSetup]
    public void Setup()
    {
        _system = Systems.FullyCoupled(Spins);
        _options = new EngineOptions(Backend == "managed" ? ManagedBackend.Instance : DenseBackends.Default);
    }

    [Benchmark]
    public int TransitionList() => SpectrumEngine.Compute(_system, _options).Lines.Count;
}

/// <summary>
/// Time and managed memory against N for fully coupled systems, 8 to 14 spins, native backend only (the managed
/// solver needs minutes beyond 12 spins). The largest block, C(N, N/2) states, sets the cost: C(N, N/2)^3 grows by
/// about 2^3 per two spins. N = 14 is issue 8's target of under 60 s and 4 GiB; its peak working set comes from a
/// separate run, <c>dotnet run -c Release --project src/SpinSim.Benchmarks -- peak 14</c>.
/// </summary>
[MemoryDiagnoser]
public class FullyCoupledScalingBenchmarks
{
    [Params(8, 9, 10, 11, 12, 13, 14)]
    public int Spins { get; set; }

    private SpinSystem _system = null!;

    [GlobalSetup]
    public void Setup() => _system = Systems.FullyCoupled(Spins);

    [Benchmark]
    public int TransitionList() => SpectrumEngine.Compute(_system).Lines.Count;
}

/// <summary>Two methyl groups and a tert-butyl group coupled to a CH and a CH2: the composite-particle path.</summary>
[MemoryDiagnoser]
public class EquivalentSetBenchmarks
{
    private readonly SpinSystem _system = Systems.MethylsAndTertButyl();

    [Benchmark]
    public int TransitionList() => SpectrumEngine.Compute(_system).Lines.Count;
}

public static class Systems
{
    /// <summary>Invented test system: N spins with seeded random shifts in 2.0-2.3 ppm and couplings of -15..15 Hz between all pairs.</summary>
    public static SpinSystem FullyCoupled(int n, double fieldMHz = 400, int seed = 1)
    {
        var random = new Random(seed);
        var nuclei = Enumerable.Range(0, n).Select(i => new Nucleus($"H{i}", 2.0 + 0.3 * random.NextDouble())).ToList();
        var couplings = new List<Coupling>();
        for (var a = 0; a < n; a++)
            for (var b = a + 1; b < n; b++)
                couplings.Add(new Coupling($"H{a}", $"H{b}", -15 + 30 * random.NextDouble()));
        return SpinSystem.Create(new FieldMHz(fieldMHz), nuclei, couplings);
    }

    /// <summary>The one diagonalisation of a system with no equivalent sets, as the engine sets it up.</summary>
    internal static SubspectrumSolver Solver(SpinSystem system, IDenseBackend backend)
    {
        var all = Enumerable.Range(0, system.Nuclei.Count).ToArray();
        var combination = SpectrumEngine.Combinations(system, all, new double[all.Length]).Single();
        return new SubspectrumSolver(combination.Particles, combination.CouplingsHz, system.Nuclei.Count, backend);
    }

    /// <summary>Invented: tBu (9), two methyls (3 each), CH and CH2 (diastereotopic pair), at 400 MHz.</summary>
    public static SpinSystem MethylsAndTertButyl() => SpinSystem.Create(new FieldMHz(400),
        [new("tBu", 1.02, 9), new("MeA", 1.12, 3), new("MeB", 0.95, 3), new("CH", 1.85), new("Ha", 1.40), new("Hb", 1.31)],
        [new("MeA", "CH", 6.8), new("MeB", "CH", 6.7), new("CH", "Ha", 7.5), new("CH", "Hb", 5.2), new("Ha", "Hb", -13.6),
         new("tBu", "Ha", 0.3)]);
}

/// <summary>
/// Issue 14's yardstick: the whole engine against its dense floor for fully coupled systems of 10, 12 and 14 spins.
/// The floor (<see cref="SubspectrumSolver.DenseFloor"/>) is dsyevd of every block in an observed transition plus one
/// V_lower^T X product per block pair, scheduled as the engine schedules them; everything else the engine does
/// (building H, applying F-, turning amplitudes into lines, merging) is its overhead over the floor.
/// </summary>
[MemoryDiagnoser]
public class EngineFloorBenchmarks
{
    [Params(10, 12, 14)]
    public int Spins { get; set; }

    private SpinSystem _system = null!;
    private Action _floor = null!;

    [GlobalSetup]
    public void Setup()
    {
        if (!DenseBackends.NativeAvailable) throw new InvalidOperationException("libopenblas.so.0 did not load: the floor would be the managed solver's");
        _system = Systems.FullyCoupled(Spins);
        _floor = Systems.Solver(_system, DenseBackends.Default).DenseFloor();
    }

    [Benchmark(Baseline = true)]
    public void Floor() => _floor();

    [Benchmark]
    public int Engine() => SpectrumEngine.Compute(_system).Lines.Count;
}
