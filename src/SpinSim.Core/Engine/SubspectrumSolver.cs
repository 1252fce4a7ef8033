using System.Collections.Concurrent;
using System.Runtime.InteropServices;
using SpinSim.Core.LinearAlgebra;


namespace SpinSim.Core.Engine;

/// <summary>A spin-F particle of one diagonalisation: a single nucleus (F = 1/2) or one total spin of an equivalent set.</summary>
/// <param name="Entry">Index of the nucleus entry of the spin system this particle stands for.</param>
/// <param name="IsotopeGroup">Particles with equal groups are homonuclear (full I.I coupling, shared M block label).</param>
internal readonly record struct Particle(int Entry, int TwiceF, int IsotopeGroup, double FrequencyHz, bool Observed);

/// <summary>
/// dH/dθ of one spin parameter among a solver's particles: Fz_P when Q is -1; F_P·F_Q between homonuclear particles
/// and Fz_P Fz_Q between heteronuclear ones (the secular coupling); nothing when P is -1 (the parameter does not act
/// on this subspectrum, as a total spin of 0 carries no shift).
/// </summary>
internal readonly record struct Generator(int P, int Q);

/// <summary>
/// Lines of one block pair before merging, in flat arrays. The origin of line k is not stored but derived on demand
/// from the expected Fz of its two eigenstates (<see cref="AddOrigin"/>), which keeps many lines cheap.
/// </summary>
internal sealed class RawLines(int[] observedEntries, double[] izUpper, double[] izLower, int capacity, int derivativeCount = 0)
{
    // Exact-size arrays, filled in order: the solver counts a pair's kept lines before it allocates them, because
    // growing lists re-copied (and, on the large-object heap, re-zeroed) every line several times.
    public readonly double[] FrequencyHz = new double[capacity];
    public readonly double[] Intensity = new double[capacity];
    private readonly long[] _states = new long[capacity]; // upper << 32 | lower

    /// <summary>Parameters differentiated by; per line dI/dθ and I·dν/dθ, as [line * DerivativeCount + parameter].</summary>
    public readonly int DerivativeCount = derivativeCount;
    public readonly double[] DIntensity = new double[(long)capacity * derivativeCount];
    public readonly double[] DMoment = new double[(long)capacity * derivativeCount];

    public int Count { get; private set; }

    public void Add(double frequencyHz, double intensity, int upper, int lower)
    {
        FrequencyHz[Count] = frequencyHz;
        Intensity[Count] = intensity;
        _states[Count] = ((long)upper << 32) | (uint)lower;
        Count++;
    }

    /// <summary>
    /// Adds <paramref name="scale"/> x the origin weights of line <paramref name="k"/> to <paramref name="row"/> (one slot
    /// per entry): the change of each entry's expected Fz between the two eigenstates. They sum to exactly 1 because the
    /// states differ by one unit of total M, and summed over all lines (times intensity) they give Tr(F+ I-_e), so the
    /// integrals they yield are exact. Single weights may be slightly negative in strongly coupled systems.
    /// </summary>
    public void AddOrigin(int k, double scale, Span<double> row)
    {
        var a = (int)(_states[k] >> 32);
        var b = (int)(_states[k] & 0xffffffff);
        var count = observedEntries.Length;
        for (var i = 0; i < count; i++)
            row[observedEntries[i]] += scale * (izUpper[a * count + i] - izLower[b * count + i]);
    }
}

/// <summary>
/// Lines below the engine's floor, pooled into bins [k w, (k + 1) w) of fixed width w. A bin keeps the sums of their
/// intensities, of intensity x frequency and of intensity x origin weight per entry, so the sum rule, the first moment
/// and the integrals stay exact while a fully coupled cluster's tens of millions of weak lines cost one bin per width.
/// Not thread-safe: each block pair fills its own and the solver merges them under a lock.
/// </summary>
internal sealed class LinePools
{
    // A block pair's lines lie in a known frequency range. When the pair has more transitions than that range has
    // bins, and the bins fit in this many doubles, they are kept in dense arrays: several times faster than a
    // dictionary for the ten million weak lines of a 14-spin pair, and never a waste for the thousands of small
    // pairs of a split molecule, which stay sparse.
    private const long DenseLimitDoubles = 8L << 20;

    private readonly int _entryCount;
    private readonly double _widthHz;

    // Sparse form: a slot per bin met.
    private readonly Dictionary<long, int> _slotOfBin = [];
    private readonly List<long> _bin = [];
    private readonly List<double> _intensity = [];
    private readonly List<double> _moment = [];
    private readonly List<double> _origin = []; // [slot * entryCount + entry]

    // Dense form: bins _firstBin .. _firstBin + length - 1.
    private readonly long _firstBin;
    private readonly double[]? _denseIntensity;
    private readonly double[]? _denseMoment;
    private readonly double[]? _denseOrigin;

    public LinePools(int entryCount, double widthHz)
    {
        _entryCount = entryCount;
        _widthHz = widthHz;
    }

    private LinePools(int entryCount, double widthHz, long firstBin, int bins) : this(entryCount, widthHz)
    {
        _firstBin = firstBin;
        _denseIntensity = new double[bins];
        _denseMoment = new double[bins];
        _denseOrigin = new double[(long)bins * entryCount];
    }

    /// <summary>Pools for up to <paramref name="transitions"/> lines between <paramref name="lowHz"/> and <paramref name="highHz"/>.</summary>
    public static LinePools ForRange(int entryCount, double widthHz, double lowHz, double highHz, long transitions)
    {
        // Bin numbers are exact only while |frequency| / width stays well inside a long and a double's 53 bits.
        if (!(Math.Max(Math.Abs(lowHz), Math.Abs(highHz)) / widthHz < 1e15)) return new LinePools(entryCount, widthHz);
        var first = BinOf(lowHz, widthHz);
        var bins = BinOf(highHz, widthHz) - first + 1;
        return bins <= transitions && bins * (entryCount + 2) <= DenseLimitDoubles
            ? new LinePools(entryCount, widthHz, first, (int)bins)
            : new LinePools(entryCount, widthHz);
    }

    private static long BinOf(double frequencyHz, double widthHz) => (long)Math.Floor(frequencyHz / widthHz);

    /// <summary>Number of bins holding lines (sparse form only; the solver's shared pools are sparse).</summary>
    public int Count => _bin.Count;

    /// <summary>How many lines went into the pools.</summary>
    public long LineCount { get; private set; }

    /// <summary>Adds one line; its origin weights are the changes of the observed entries' expected Fz.</summary>
    public void Add(double frequencyHz, double intensity, int[] observedEntries, ReadOnlySpan<double> izUpper, ReadOnlySpan<double> izLower)
    {
        var bin = BinOf(frequencyHz, _widthHz);
        Span<double> origin;
        if (_denseIntensity is not null)
        {
            var k = (int)(bin - _firstBin);
            _denseIntensity[k] += intensity;
            _denseMoment![k] += intensity * frequencyHz;
            origin = _denseOrigin.AsSpan((int)((long)k * _entryCount), _entryCount);
            LineCount++;
        }
        else origin = Slot(bin, intensity, intensity * frequencyHz, 1);
        for (var i = 0; i < observedEntries.Length; i++) origin[observedEntries[i]] += intensity * (izUpper[i] - izLower[i]);
    }

    public void MergeFrom(LinePools other)
    {
        if (other._denseIntensity is { } intensity)
        {
            for (var k = 0; k < intensity.Length; k++)
            {
                if (intensity[k] == 0) continue;
                var origin = Slot(other._firstBin + k, intensity[k], other._denseMoment![k], 0);
                var from = other._denseOrigin.AsSpan((int)((long)k * _entryCount), _entryCount);
                for (var e = 0; e < _entryCount; e++) origin[e] += from[e];
            }
        }
        else
        {
            for (var k = 0; k < other.Count; k++)
            {
                var origin = Slot(other._bin[k], other._intensity[k], other._moment[k], 0);
                for (var e = 0; e < _entryCount; e++) origin[e] += other._origin[k * _entryCount + e];
            }
        }
        LineCount += other.LineCount;
    }

    /// <summary>One line per bin at the intensity-weighted mean frequency, sorted, with origin rows normalised to sum 1.</summary>
    public (Line[] Lines, double[] Origin) ToLines(double observeMHz)
    {
        var order = Enumerable.Range(0, Count).OrderBy(k => _bin[k]).ToArray();
        var lines = new Line[Count];
        var origin = new double[(long)Count * _entryCount];
        for (var i = 0; i < order.Length; i++)
        {
            var k = order[i];
            var f = _moment[k] / _intensity[k];
            lines[i] = new Line(f, f / observeMHz, _intensity[k]);
            for (var e = 0; e < _entryCount; e++) origin[(long)i * _entryCount + e] = _origin[k * _entryCount + e] / _intensity[k];
        }
        return (lines, origin);
    }

    private Span<double> Slot(long bin, double intensity, double moment, long lines)
    {
        if (!_slotOfBin.TryGetValue(bin, out var slot))
        {
            slot = _bin.Count;
            _slotOfBin[bin] = slot;
            _bin.Add(bin);
            _intensity.Add(0);
            _moment.Add(0);
            for (var e = 0; e < _entryCount; e++) _origin.Add(0);
        }
        _intensity[slot] += intensity;
        _moment[slot] += moment;
        LineCount += lines;
        return CollectionsMarshal.AsSpan(_origin).Slice(slot * _entryCount, _entryCount);
    }
}

/// <summary>
/// Diagonalises the secular Hamiltonian H = sum nu_p Fz_p + sum J_pq (F_p . F_q) [homonuclear] or J_pq Fz_p Fz_q
/// [heteronuclear] of a few particles, block by block in the z-magnetisation of each isotope, and returns the
/// observed lines of F- = sum over observed particles of F-_p, each intensity multiplied by <c>weight</c>.
/// </summary>
internal sealed class SubspectrumSolver
{
    private readonly Particle[] _particles;
    private readonly double[,] _jHz;
    private readonly int _entryCount;
    private readonly IDenseBackend _backend;

    /// <summary>Blocks of at least this many states are worth spreading over threads.</summary>
    internal const int ParallelBlockSize = 64;

    private readonly int[] _dims;
    private readonly int[] _strides;
    private readonly int _totalStates;

    public SubspectrumSolver(Particle[] particles, double[,] couplingsHz, int entryCount, IDenseBackend backend)
    {
        _particles = particles;
        _jHz = couplingsHz;
        _entryCount = entryCount;
        _backend = backend;
        _dims = particles.Select(p => p.TwiceF + 1).ToArray();
        _strides = new int[particles.Length];
        long total = 1;
        for (var p = particles.Length - 1; p >= 0; p--)
        {
            _strides[p] = (int)total;
            total *= _dims[p];
            if (total > int.MaxValue / 4) throw new InvalidOperationException("state space too large to enumerate; the caller must check the resource estimate first");
        }
        _totalStates = (int)total;
    }

    /// <summary>Sizes of the blocks this solver will diagonalise, without building them.</summary>
    public IReadOnlyList<int> BlockSizes() => Partition().Blocks.Select(b => b.Length).ToArray();

    /// <summary>Size of the product space of the particles.</summary>
    public int StateCount => _totalStates;

    /// <summary>Whether lines below the floor are pooled (the default) or dropped; see <see cref="EngineOptions.PoolWeakLines"/>.</summary>
    public bool PoolWeakLines { get; init; } = true;

    /// <summary>The largest block of H as <see cref="IDenseBackend.SymmetricEigen"/> receives it (for the dense-rate benchmarks).</summary>
    internal (int Size, double[] Matrix) LargestBlock()
    {
        var (blocks, local, _, _, _, _) = Plan();
        var largest = blocks.MaxBy(b => b.Length)!;
        return (largest.Length, BuildBlock(largest, local));
    }

    /// <summary>
    /// The dense floor of <see cref="Solve"/> (issue 14's yardstick, for the benchmarks): dsyevd of every block that takes
    /// part in an observed transition and, per observed block pair, the one product V_lower^T X that gives the transition
    /// elements, scheduled as <see cref="Solve"/> schedules them (largest first, one solve per core), with nothing else:
    /// no Hamiltonian build, no F- application, no line list. The blocks are built once, outside the timed part.
    /// </summary>
    internal Action DenseFloor()
    {
        var (blocks, local, pairs, order, pairOrder, threads) = Plan();
        var built = blocks.Select((codes, b) => order.Contains(b) ? BuildBlock(codes, local) : []).ToArray();
        var work = built.Select(h => new double[h.Length]).ToArray();
        var eigenvalues = blocks.Select(codes => new double[codes.Length]).ToArray();
        var products = pairs.Select(p => (X: new double[(long)blocks[p.Lower].Length * blocks[p.Upper].Length], T: new double[(long)blocks[p.Lower].Length * blocks[p.Upper].Length])).ToArray();
        var parallel = new ParallelOptions { MaxDegreeOfParallelism = threads };
        return () =>
        {
            Parallel.ForEach(Partitioner.Create(order, EnumerablePartitionerOptions.NoBuffering), parallel, b =>
            {
                Array.Copy(built[b], work[b], built[b].Length);
                _backend.SymmetricEigen(blocks[b].Length, work[b], eigenvalues[b]);
            });
            Parallel.ForEach(Partitioner.Create(pairOrder, EnumerablePartitionerOptions.NoBuffering), parallel, k =>
            {
                var (u, l) = pairs[k];
                int nu = blocks[u].Length, nl = blocks[l].Length;
                _backend.MultiplyTransposedA(nl, nu, nl, work[l], products[k].X, products[k].T);
            });
        };
    }

    /// <summary>
    /// Transitions whose amplitude is below 1e-10 (intensity 1e-20 per unit weight) are taken as zero and dropped:
    /// eigenvector roundoff gives forbidden transitions amplitudes of order 1e-15 to 1e-13, and a real line that weak
    /// is 1e-20 of a single-spin line, so the intensity left out is far below any tolerance of the sum rule.
    /// </summary>
    internal const double ZeroIntensityPerWeight = 1e-20;

    /// <summary>The lines of every observed block pair, and the weak lines below <paramref name="intensityFloor"/> added to <paramref name="pools"/>.</summary>
    /// <param name="generators">When given, every kept line also gets its derivatives by these parameters (pooling must be off).</param>
    public RawLines[] Solve(double weight, double intensityFloor, LinePools pools, double poolWidthHz, CancellationToken cancel,
        Generator[]? generators = null)
    {
        if (generators is { Length: > 0 } && PoolWeakLines)
            throw new InvalidOperationException("line derivatives need weak-line pooling off: a pool has no derivatives");
        var (blocks, local, pairs, order, pairOrder, threads) = Plan();
        // Eigen-decomposition of every block that takes part in an observed transition.
        var vectors = new double[blocks.Count][];
        var energies = new double[blocks.Count][];
        var parallel = new ParallelOptions { CancellationToken = cancel, MaxDegreeOfParallelism = threads };
        Parallel.ForEach(Partitioner.Create(order, EnumerablePartitionerOptions.NoBuffering), parallel, b =>
        {
            var n = blocks[b].Length;
            var h = BuildBlock(blocks[b], local);
            var w = new double[n];
            _backend.SymmetricEigen(n, h, w);
            vectors[b] = h;
            energies[b] = w;
        });

        var observed = Enumerable.Range(0, _particles.Length).Where(p => _particles[p].Observed).ToArray();
        var iz = new double[blocks.Count][];
        var perturbed = new BlockPerturbation?[blocks.Count];
        Parallel.ForEach(Partitioner.Create(order, EnumerablePartitionerOptions.NoBuffering), parallel, b =>
        {
            iz[b] = ExpectedIz(blocks[b], vectors[b], observed);
            if (generators is { Length: > 0 }) perturbed[b] = Perturbation(blocks[b], local, vectors[b], energies[b], generators);
        });

        var results = new RawLines[pairs.Count];
        Parallel.ForEach(Partitioner.Create(pairOrder, EnumerablePartitionerOptions.NoBuffering), parallel, k =>
        {
            var (u, l) = pairs[k];
            // Eigenvalues are ascending, so the pair's lines lie between these two frequencies.
            var weak = LinePools.ForRange(_entryCount, poolWidthHz, energies[u][0] - energies[l][^1], energies[u][^1] - energies[l][0],
                (long)energies[u].Length * energies[l].Length);
            results[k] = Transitions(blocks[u], blocks[l], vectors[u], vectors[l], energies[u], energies[l], iz[u], iz[l], local, observed,
                weight, intensityFloor, weak, perturbed[u], perturbed[l]);
            lock (pools) pools.MergeFrom(weak);
        });
        return results;
    }

    /// <summary>
    /// How <see cref="Solve"/> (and <see cref="DenseFloor"/>) go through the blocks: each state's index in its block, the
    /// observed block pairs (upper, lower), the blocks in them largest first, the pairs by their product's cost, and the
    /// threads. Largest first, one block per take: the default partitioning of an array hands out ranges, which left one
    /// core idle while the other worked through the large blocks of a fully coupled cluster. At most one dense solve per
    /// core: the thread pool adds threads when work items run long, and more concurrent solves than cores only lengthen
    /// the largest block's turn. Thread hand-offs cost more than small blocks, so below ParallelBlockSize one thread does all.
    /// </summary>
    private (List<int[]> Blocks, int[] Local, List<(int Upper, int Lower)> Pairs, int[] Order, int[] PairOrder, int Threads) Plan()
    {
        var (blocks, keyOf, lowerKeyStep) = Partition();
        var blockIndexOfKey = new Dictionary<long, int>();
        for (var b = 0; b < blocks.Count; b++) blockIndexOfKey[keyOf[b]] = b;
        var local = new int[_totalStates];
        foreach (var codes in blocks)
            for (var i = 0; i < codes.Length; i++) local[codes[i]] = i;
        var pairs = new List<(int Upper, int Lower)>();
        var needed = new bool[blocks.Count];
        for (var b = 0; b < blocks.Count; b++)
            if (lowerKeyStep != 0 && blockIndexOfKey.TryGetValue(keyOf[b] - lowerKeyStep, out var lower))
            {
                pairs.Add((b, lower));
                needed[b] = needed[lower] = true;
            }
        var order = Enumerable.Range(0, blocks.Count).Where(b => needed[b]).OrderByDescending(b => blocks[b].Length).ToArray();
        var pairOrder = Enumerable.Range(0, pairs.Count)
            .OrderByDescending(k => (double)blocks[pairs[k].Lower].Length * blocks[pairs[k].Lower].Length * blocks[pairs[k].Upper].Length).ToArray();
        var threads = order.Length > 0 && blocks[order[0]].Length >= ParallelBlockSize ? Environment.ProcessorCount : 1;
        return (blocks, local, pairs, order, pairOrder, threads);
    }

    private (List<int[]> Blocks, long[] KeyOf, long LowerKeyStep) Partition()
    {
        var groups = _particles.Length == 0 ? 0 : _particles.Max(p => p.IsotopeGroup) + 1;
        var maxTwiceM = new int[groups];
        foreach (var p in _particles) maxTwiceM[p.IsotopeGroup] += p.TwiceF;
        var radix = new long[groups];
        long r = 1;
        for (var g = 0; g < groups; g++) { radix[g] = r; r *= 2L * maxTwiceM[g] + 1; }

        var observedGroup = _particles.Where(p => p.Observed).Select(p => p.IsotopeGroup).DefaultIfEmpty(-1).First();
        var lowerKeyStep = observedGroup >= 0 ? 2 * radix[observedGroup] : 0;

        var byKey = new Dictionary<long, List<int>>();
        var digits = new int[_particles.Length];
        for (var code = 0; code < _totalStates; code++)
        {
            long key = 0;
            for (var g = 0; g < groups; g++) key += maxTwiceM[g] * radix[g];
            for (var p = 0; p < _particles.Length; p++)
                key += (2L * digits[p] - _particles[p].TwiceF) * radix[_particles[p].IsotopeGroup];
            if (!byKey.TryGetValue(key, out var list)) byKey[key] = list = [];
            list.Add(code);
            Increment(digits);
        }
        var keys = byKey.Keys.OrderBy(k => k).ToArray();
        return (keys.Select(k => byKey[k].ToArray()).ToList(), keys, lowerKeyStep);
    }

    private void Increment(int[] digits)
    {
        for (var p = digits.Length - 1; p >= 0; p--)
        {
            if (++digits[p] < _dims[p]) return;
            digits[p] = 0;
        }
    }

    private double M(int code, int p) => (code / _strides[p]) % _dims[p] - _particles[p].TwiceF / 2.0;

    /// <summary>The block of H in the product basis, column-major, lower triangle and diagonal filled.</summary>
    private double[] BuildBlock(int[] codes, int[] local)
    {
        var n = codes.Length;
        var h = new double[(long)n * n];
        var count = _particles.Length;
        var m = new double[count];
        for (var i = 0; i < n; i++)
        {
            var code = codes[i];
            for (var p = 0; p < count; p++) m[p] = M(code, p);
            var diagonal = 0.0;
            for (var p = 0; p < count; p++)
            {
                diagonal += _particles[p].FrequencyHz * m[p];
                for (var q = p + 1; q < count; q++) diagonal += _jHz[p, q] * m[p] * m[q];
            }
            h[i + (long)i * n] = diagonal;

            // Flip-flop terms J/2 (F+_p F-_q + F-_p F+_q) connect states of the same block.
            for (var p = 0; p < count; p++)
                for (var q = 0; q < count; q++)
                {
                    if (q == p || _jHz[p, q] == 0 || _particles[q].IsotopeGroup != _particles[p].IsotopeGroup) continue;
                    if (!RaiseLower(code, p, q, m[p], m[q], 0.5 * _jHz[p, q], out var target, out var element)) continue;
                    var j = local[target];
                    if (j < i) continue; // fill the lower triangle only: row j >= column i
                    h[j + (long)i * n] = element;
                }
        }
        return h;
    }

    /// <summary>
    /// factor x F+_x F-_y applied to product state <paramref name="code"/> (with M values <paramref name="mx"/>,
    /// <paramref name="my"/> of the two particles): the state with x raised and y lowered, and the matrix element;
    /// false when x is at its top or y at its bottom.
    /// </summary>
    private bool RaiseLower(int code, int x, int y, double mx, double my, double factor, out int target, out double element)
    {
        var fx = _particles[x].TwiceF / 2.0;
        var fy = _particles[y].TwiceF / 2.0;
        (target, element) = (-1, 0);
        if (mx >= fx || my <= -fy) return false;
        target = code + _strides[x] - _strides[y];
        element = factor * CompositeSpins.LadderElement(fx, mx, +1) * CompositeSpins.LadderElement(fy, my, -1);
        return true;
    }

    private RawLines Transitions(int[] upperCodes, int[] lowerCodes, double[] vUpper, double[] vLower,
        double[] eUpper, double[] eLower, double[] izUpper, double[] izLower, int[] local, int[] observed, double weight, double intensityFloor,
        LinePools weak, BlockPerturbation? pu, BlockPerturbation? pl)
    {
        int nu = upperCodes.Length, nl = lowerCodes.Length;

        // X = F- V_upper, built column by column from the sparse F- (at most one target per particle).
        var entries = new List<(int Row, int Col, double Value)>();
        for (var i = 0; i < nu; i++)
        {
            var code = upperCodes[i];
            foreach (var p in observed)
            {
                var m = M(code, p);
                var f = _particles[p].TwiceF / 2.0;
                if (m <= -f) continue;
                entries.Add((local[code - _strides[p]], i, CompositeSpins.LadderElement(f, m, -1)));
            }
        }
        var x = new double[(long)nl * nu];
        for (var a = 0; a < nu; a++)
        {
            var column = (long)a * nl;
            var source = (long)a * nu;
            foreach (var (row, col, value) in entries)
                x[column + row] += value * vUpper[source + col];
        }
        var t = new double[(long)nl * nu];
        _backend.MultiplyTransposedA(nl, nu, nl, vLower, x, t);

        var observedEntries = observed.Select(p => _particles[p].Entry).ToArray();
        var derivatives = pu is null || pl is null ? 0 : pu.Vt.Length;
        var kept = 0;
        foreach (var amplitude in t)
            if (weight * amplitude * amplitude > intensityFloor) kept++;
        var lines = new RawLines(observedEntries, izUpper, izLower, kept, derivatives);
        var zero = PoolWeakLines ? ZeroIntensityPerWeight * weight : double.PositiveInfinity;
        var count = observed.Length;
        // T by rows as well, for the derivative's sum over upper states (a contiguous row of T).
        double[]? rows = null;
        if (derivatives > 0)
        {
            rows = new double[(long)nl * nu];
            for (var a = 0; a < nu; a++)
                for (var b = 0; b < nl; b++) rows[b * (long)nu + a] = t[b + (long)a * nl];
        }
        for (var a = 0; a < nu; a++)
            for (var b = 0; b < nl; b++)
            {
                var amplitude = t[b + (long)a * nl];
                var intensity = weight * amplitude * amplitude;
                if (intensity > intensityFloor)
                {
                    lines.Add(eUpper[a] - eLower[b], intensity, a, b);
                    if (derivatives > 0) AddDerivatives(lines, t, rows!, nu, nl, a, b, amplitude, weight, pu!, pl!);
                }
                else if (intensity > zero)
                    weak.Add(eUpper[a] - eLower[b], intensity, observedEntries, izUpper.AsSpan(a * count, count), izLower.AsSpan(b * count, count));
            }
        return lines;
    }

    /// <summary>
    /// For each generator V of one block: Vt = U^T V U in the eigenbasis U, and the first-order mixing
    /// C[m, a] = Vt[m, a] / (E_a - E_m) of eigenvector a with m (zero when the two are degenerate), both column-major;
    /// and the runs of degenerate eigenvalues (ascending, so degenerate states are neighbours).
    /// </summary>
    internal sealed record BlockPerturbation(double[][] Vt, double[][] C, int[] ClusterFirst, int[] ClusterEnd);

    /// <summary>
    /// Eigenvalues closer than this fraction of the largest |E| of their block are taken as degenerate: roundoff
    /// separates exactly degenerate ones by about 1e-13 of it, and a pair treated as degenerate although split by dE
    /// changes the derivative of the spectrum by a relative (dE / linewidth)^2 only.
    /// </summary>
    private const double DegenerateFraction = 1e-9;

    private BlockPerturbation Perturbation(int[] codes, int[] local, double[] u, double[] e, Generator[] generators)
    {
        var n = codes.Length;
        var tolerance = DegenerateFraction * Math.Max(1, e.Select(Math.Abs).Max());
        var first = new int[n];
        var end = new int[n];
        for (var a = 0; a < n;)
        {
            var b = a + 1;
            while (b < n && e[b] - e[b - 1] <= tolerance) b++;
            for (var c = a; c < b; c++) { first[c] = a; end[c] = b; }
            a = b;
        }
        var vt = new double[generators.Length][];
        var mixing = new double[generators.Length][];
        for (var g = 0; g < generators.Length; g++)
        {
            var w = GeneratorTimes(generators[g], codes, local, u);
            var v = new double[(long)n * n];
            if (w is not null)
            {
                if ((long)n * n * n <= SmallDense.Limit) SmallDense.MultiplyTransposedA(n, n, n, u, w, v);
                else _backend.MultiplyTransposedA(n, n, n, u, w, v);
            }
            var c = new double[(long)n * n];
            for (var a = 0; a < n; a++)
                for (var m = 0; m < n; m++)
                    if (m < first[a] || m >= end[a]) c[m + (long)a * n] = v[m + (long)a * n] / (e[a] - e[m]);
            vt[g] = v;
            mixing[g] = c;
        }
        return new BlockPerturbation(vt, mixing, first, end);
    }

    /// <summary>V U for generator V in the product basis of a block (null when V is zero here).</summary>
    private double[]? GeneratorTimes(Generator g, int[] codes, int[] local, double[] u)
    {
        if (g.P < 0) return null;
        var n = codes.Length;
        var w = new double[(long)n * n];
        var homonuclear = g.Q >= 0 && _particles[g.P].IsotopeGroup == _particles[g.Q].IsotopeGroup;
        for (var i = 0; i < n; i++)
        {
            var code = codes[i];
            var diagonal = g.Q < 0 ? M(code, g.P) : M(code, g.P) * M(code, g.Q);
            if (diagonal != 0)
                for (var a = 0; a < n; a++) w[i + (long)a * n] += diagonal * u[i + (long)a * n];
            if (!homonuclear) continue;
            // (F+_x F-_y + F-_x F+_y) / 2 takes state i to the state with x raised and y lowered, for (x, y) both ways.
            foreach (var (x, y) in new[] { (g.P, g.Q), (g.Q, g.P) })
            {
                if (!RaiseLower(code, x, y, M(code, x), M(code, y), 0.5, out var target, out var element)) continue;
                var j = local[target];
                for (var a = 0; a < n; a++) w[j + (long)a * n] += element * u[i + (long)a * n];
            }
        }
        return w;
    }

    /// <summary>
    /// Derivatives of line (a, b) with amplitude T_ba: dT_ba = sum_m T_bm C_u[m, a] + sum_n C_l[n, b] T_na, so
    /// dI = 2 w T_ba dT_ba; and I dν = w T_ba (sum over a' degenerate with a of Vt_u[a', a] T_ba' - sum over b'
    /// degenerate with b of Vt_l[b', b] T_b'a), which is w T_ba^2 (dE_a - dE_b) when neither state is degenerate
    /// (Hellmann-Feynman) and gives the exact sum over coincident lines when they are (degenerate perturbation theory).
    /// </summary>
    private static void AddDerivatives(RawLines lines, double[] t, double[] rows, int nu, int nl, int a, int b, double amplitude, double weight,
        BlockPerturbation pu, BlockPerturbation pl)
    {
        var row = rows.AsSpan(b * nu, nu);
        var column = t.AsSpan(a * nl, nl);
        var at = (long)(lines.Count - 1) * lines.DerivativeCount; // the line just added
        for (var g = 0; g < pu.Vt.Length; g++)
        {
            var dt = SmallDense.Dot(row, pu.C[g].AsSpan(a * nu, nu)) + SmallDense.Dot(pl.C[g].AsSpan(b * nl, nl), column);
            double upper = 0, lower = 0;
            for (var a2 = pu.ClusterFirst[a]; a2 < pu.ClusterEnd[a]; a2++) upper += pu.Vt[g][a2 + (long)a * nu] * row[a2];
            for (var b2 = pl.ClusterFirst[b]; b2 < pl.ClusterEnd[b]; b2++) lower += pl.Vt[g][b2 + (long)b * nl] * column[b2];
            lines.DIntensity[at + g] = 2 * weight * amplitude * dt;
            lines.DMoment[at + g] = weight * amplitude * (upper - lower);
        }
    }

    /// <summary>&lt;a|Fz_p|a&gt; for every eigenstate a and observed particle p, as [a * observed.Length + k].</summary>
    private double[] ExpectedIz(int[] codes, double[] v, int[] observed)
    {
        var n = codes.Length;
        var count = observed.Length;
        var m = new double[n * count];
        for (var i = 0; i < n; i++)
            for (var k = 0; k < count; k++) m[i * count + k] = M(codes[i], observed[k]);
        var result = new double[n * count];
        for (var a = 0; a < n; a++)
        {
            var column = (long)a * n;
            for (var i = 0; i < n; i++)
            {
                var c2 = v[column + i] * v[column + i];
                for (var k = 0; k < count; k++) result[a * count + k] += c2 * m[i * count + k];
            }
        }
        return result;
    }
}
