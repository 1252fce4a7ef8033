using BenchmarkDotNet.Attributes;
using SpinSim.Core.Engine;
using SpinSim.Core.LinearAlgebra;

namespace SpinSim.Benchmarks;

/// <summary>
/// The practical peak of dense linear algebra here: dgemm (C = A^T B, 2 n^3 flops) through
/// <see cref="OpenBlasBackend.MultiplyTransposedA"/>, on one core (OpenBLAS runs single-threaded inside SpinSim, which
/// parallelises over blocks itself) and on both cores at once (two independent products, 4 n^3 flops).
/// GFLOP/s = flops / mean time; the engine's rates are compared with these.
/// </summary>
[MemoryDiagnoser]
public class DgemmRateBenchmarks
{
    [Params(1000, 2000, 3432)]
    public int N { get; set; }

    private readonly IDenseBackend _backend = DenseBackends.Default;
    private double[] _a = [], _b = [], _c = [], _a2 = [], _b2 = [], _c2 = [];

    [GlobalSetup]
    public void Setup()
    {
        if (!DenseBackends.NativeAvailable) throw new InvalidOperationException("libopenblas.so.0 did not load: these rates would be the managed solver's");
        var random = new Random(7);
        double[] Matrix() => Enumerable.Range(0, N * N).Select(_ => random.NextDouble() - 0.5).ToArray();
        (_a, _b, _c, _a2, _b2, _c2) = (Matrix(), Matrix(), new double[N * N], Matrix(), Matrix(), new double[N * N]);
    }

    [Benchmark]
    public void DgemmOneCore() => _backend.MultiplyTransposedA(N, N, N, _a, _b, _c);

    [Benchmark]
    public void DgemmTwoCores() => Parallel.Invoke(
        () => _backend.MultiplyTransposedA(N, N, N, _a, _b, _c),
        () => _backend.MultiplyTransposedA(N, N, N, _a2, _b2, _c2));
}

/// <summary>
/// dsyevd with eigenvectors on the largest block of a fully coupled N-spin system (the M = 0 block: 924, 1716 and 3432
/// states for 12, 13 and 14 spins), one core. Its effective rate needs a flop model, and both below are models, not
/// counts: the conventional 9 n^3 of a symmetric eigen-decomposition with vectors (the symmetric QR algorithm with
/// accumulated vectors, Golub and Van Loan, Matrix Computations; figure from memory), and for dsyevd's own steps
/// 4/3 n^3 (tridiagonal reduction, dsytrd) + at most about 4/3 n^3 (divide and conquer, dstedc, less with deflation)
/// + 2 n^3 (back-transformation, dormtr), about 4.7 n^3.
/// </summary>
[MemoryDiagnoser]
public class DsyevdRateBenchmarks
{
    [Params(12, 13, 14)]
    public int Spins { get; set; }

    private readonly IDenseBackend _backend = DenseBackends.Default;
    private double[] _block = [], _work = [], _eigenvalues = [];
    private int _n;

    [GlobalSetup]
    public void Setup()
    {
        if (!DenseBackends.NativeAvailable) throw new InvalidOperationException("libopenblas.so.0 did not load: these rates would be the managed solver's");
        (_n, _block) = Systems.Solver(Systems.FullyCoupled(Spins), _backend).LargestBlock();
        _work = new double[_block.Length];
        _eigenvalues = new double[_n];
    }

    [Benchmark]
    public void Dsyevd()
    {
        // dsyevd overwrites its input; the copy costs n^2, nothing beside the n^3 solve.
        Array.Copy(_block, _work, _block.Length);
        _backend.SymmetricEigen(_n, _work, _eigenvalues);
    }
}
