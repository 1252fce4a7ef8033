using System.Buffers;
// Method: far fields as multipole expansions of the Cauchy kernel about grid nodes (L. Greengard and V. Rokhlin, J. Comput. Phys. 73, 325, 1987, here in one dimension), summed by FFT convolution.
using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using SpinSim.Core.LinearAlgebra;

namespace SpinSim.Core.Spectrum;

/// <summary>
/// Draws lines onto a <see cref="SpectrumGrid"/> as a trace in area units per Hz: at every grid point, the sum over all
/// lines of area x profile, each profile whole (no cut-off), to within <see cref="Tolerance"/> of each line's peak.
/// The cost is O(lines + points log points).
/// </summary>
/// <remarks>
/// <para>Work is in grid steps s, on an axis ascending in Hz. Each line's complex profile P = A + i D (see
/// <see cref="LineProfile"/>) is (i / (pi s)) / (x - zeta) for a Lorentzian, zeta = u - i h (u the centre, h the
/// half-width, both in steps), and a Gaussian average of that over the centre for a Voigt or Gaussian (the Voigt is a
/// Lorentzian convolved with a Gaussian). Two ways of summing it are used:</para>
/// <para>Smooth lines (many lines of one width, wide against a step): each line is deposited on the 12 grid nodes
/// around it with Lagrange interpolation weights, and the deposits are convolved with the profile sampled at every
/// distance of the grid, by FFT (for a Voigt too narrow for that, on a grid 2 or 4 times finer, of which the trace takes
/// every 2nd or 4th point). The interpolation error of the profile is at most prod|u - n_k| max|P^(12)| / 12!,
/// where |P^(12)| is at most 12! / (pi h^13) for a Lorentzian component and 1.09 sqrt(12!) sigma^-12 times the
/// Gaussian's peak for a Gaussian component (Cramér's bound on Hermite functions); a width is drawn this way only
/// when that is below the tolerance.</para>
/// <para>All other lines: about its nearest node n, 1/(x - zeta) = sum_K (zeta - n)^K / (x - n)^(K+1), and the Gaussian
/// average turns (zeta - n)^K into its moments m_K (m_(K+1) = w m_K + K sigma^2 m_(K-1), w = zeta - n, by Stein's
/// identity). The moments of all lines are deposited at their nodes, one array per K, and convolved by FFT with
/// 1/d^(K+1) for node distances |d| &gt; R; within R of its node each line is evaluated directly. R is five times the
/// largest |w| + 2.5 sigma (rounded up to a multiple of 8, so that similar spectra share kernels), so that 14 terms leave
/// less than 5^-14 of each line's far field.</para>
/// <para>Lines more than a grid's width outside the grid are evaluated directly at every point, and so is every line
/// when there are few (at most 2^22 line-point evaluations) and each point is cheap. Large jobs run in
/// parallel; the result depends on the machine's core count only in the last bits, never on thread timing.</para>
/// </remarks>
public static class TraceSynthesizer
{
    /// <summary>Error bound aimed at, relative to each line's peak height (the tests hold the trace to 1e-9 of its tallest point).</summary>
    public const double Tolerance = 1e-11;

    // Lagrange deposit of smooth lines: nodes floor(u) - 5 .. floor(u) + 6; Prod|u - n_k| is at most PlusMinus at u = 1/2.
    private const int LagrangeNodes = 12;
    private static readonly double LagrangeProductBound = Math.Pow(0.5 * 1.5 * 2.5 * 3.5 * 4.5 * 5.5, 2);

    // Multipole terms of the far field and the near radius per unit of |w| + 2 sigma.
    private const int Terms = 14;
    private const double RadiusPerReach = 5;
    private const int MinimumRadius = 8;

    /// <summary>A width drawn by the smooth route needs at least this many lines to pay for its FFT.</summary>
    private const int SmoothGroupMinimum = 1024;

    private const int SmoothGroupMost = 8;

    /// <summary>Up to this many evaluations (lines x points) every line is evaluated at every point, with no transform.</summary>
    private const long DirectEvaluationsMost = 1L << 22;

    // Below this many profile evaluations a second thread costs more than it saves.
    private const long ParallelThresholdEvaluations = 400_000;

    private static readonly object CacheLock = new();
    private static readonly List<(int N, int Radius, double[][] Transforms)> FarKernelCache = [];

    /// <inheritdoc cref="Render(ReadOnlySpan{RenderLine}, SpectrumGrid, Lineshape, PhaseRotation)"/>
    /// <remarks>A Voigt gets equal Lorentzian and Gaussian components (<see cref="Lineshape.FromKind"/>).</remarks>
    public static double[] Render(ReadOnlySpan<RenderLine> lines, SpectrumGrid grid, LineshapeKind shape) =>
        Render(lines, grid, Lineshape.FromKind(shape), PhaseRotation.None);

    /// <inheritdoc cref="Render(ReadOnlySpan{RenderLine}, SpectrumGrid, Lineshape, PhaseRotation)"/>
    public static double[] Render(ReadOnlySpan<RenderLine> lines, SpectrumGrid grid, Lineshape shape) =>
        Render(lines, grid, shape, PhaseRotation.None);

    /// <summary>
    /// The trace of <paramref name="lines"/> on <paramref name="grid"/>, one value per grid point, in area units per Hz:
    /// the absorption, or with a <paramref name="phase"/> error A cos phi - D sin phi (synthetic data for demonstrations
    /// and tests of fitting).
    /// </summary>
    /// <exception cref="ArgumentException">A line with a non-finite centre or area, or a width that is not positive and finite.</exception>
    public static double[] Render(ReadOnlySpan<RenderLine> lines, SpectrumGrid grid, Lineshape shape, PhaseRotation phase)
    {
        ArgumentNullException.ThrowIfNull(grid);
        ArgumentNullException.ThrowIfNull(shape);
        Validate(lines);
        var points = grid.Points;
        // An axis ascending in Hz; a descending grid is drawn mirrored and turned round at the end.
        var reversed = grid.StepHz < 0;
        var step = Math.Abs(grid.StepHz);
        var firstHz = reversed ? grid.HzAt(points - 1) : grid.HzAt(0);
        var axis = new Axis(firstHz, step, points);

        var trace = new double[points];
        var smooth = new List<(LineProfile Profile, int Oversampling, List<int> Lines)>();
        var multipole = new List<int>();
        var direct = new List<int>();
        // In the order of their positions: deposits and near fields then write along the arrays, not all over them.
        var all = InPositionOrder(lines, axis);
        Classify(all.AsSpan(0, lines.Length), shape, phase, axis, smooth, multipole, direct);
        // Few lines: each evaluated at every point costs less than the transforms (and, in a fresh process, than setting
        // them up), where a point costs a few nanoseconds: not a Gaussian or Voigt with a phase error, whose dispersion
        // needs the Faddeeva function at every point.
        var transformed = multipole.Count + smooth.Sum(group => group.Lines.Count);
        var cheapEverywhere = phase.Sin == 0 || shape.Kind == LineshapeKind.Lorentzian;
        if (cheapEverywhere && (long)transformed * points <= DirectEvaluationsMost)
        {
            foreach (var (_, _, group) in smooth) direct.AddRange(group);
            direct.AddRange(multipole);
            smooth.Clear();
            multipole.Clear();
        }

        // The grid span the FFT must cover without wrapping: every deposit node and every output point.
        long lowest = 0, highest = points - 1;
        var radius = 0;
        var widest = 0.0;
        foreach (var l in multipole)
        {
            var node = Math.Round(axis.Position(all[l].CentreHz));
            lowest = Math.Min(lowest, (long)node);
            highest = Math.Max(highest, (long)node);
            widest = Math.Max(widest, all[l].FwhmHz);
        }
        // The near radius grows with the width for every shape (the components scale with it).
        if (multipole.Count > 0) radius = FarRadius(shape.Profile(widest), step);
        foreach (var (_, _, group) in smooth)
            foreach (var l in group)
            {
                var node = Math.Floor(axis.Position(all[l].CentreHz));
                lowest = Math.Min(lowest, (long)node - LagrangeNodes / 2 + 1);
                highest = Math.Max(highest, (long)node + LagrangeNodes / 2);
            }

        if (smooth.Count > 0 || multipole.Count > 0)
        {
            // Distances up to N/2 either way are represented: N/2 must exceed every node-to-point distance.
            var half = Math.Max(highest + 1, points - lowest);
            var n = (int)BitOperations.RoundUpToPowerOf2((ulong)(2 * half));
            var spectrum = AlignedComplexArray.Rent(n);
            var far = multipole.Count > 0 ? FarKernels(n, radius) : null;
            var jobs = new List<Action<AlignedComplexArray>>();
            foreach (var (profile, oversampling, group) in smooth)
                jobs.Add(sum => AddSmooth(all, group, profile, oversampling, phase, axis, n, sum));
            // Each smooth group into its own (pooled) spectrum, summed in job order, so that the trace is the same on every
            // run; then the far fields, their deposits transformed in parallel and added in one pass.
            var parts = new AlignedComplexArray[jobs.Count];
            Parallel.For(0, jobs.Count, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount }, j =>
            {
                parts[j] = AlignedComplexArray.Rent(n);
                jobs[j](parts[j]);
            });
            foreach (var part in parts)
            {
                var total = spectrum.Span;
                var add = part.Span;
                for (var k = 0; k < n; k++) total[k] += add[k];
                part.Return();
            }
            AlignedComplexArray[]? deposits = null;
            if (far is not null)
            {
                deposits = FarDeposits(all, multipole, shape, phase, axis, n);
                Parallel.For(0, deposits.Length, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount }, p => Fft.Forward(deposits[p].Span));
                AddFarFields(deposits, far, spectrum);
            }
            var result = spectrum.Span;
            Fft.Inverse(result);
            for (var j = 0; j < points; j++) trace[j] = result[j].Real / n;
            spectrum.Return();
            foreach (var d in deposits ?? []) d.Return();
        }

        var near = new List<(int Line, int Radius)>(multipole.Count + direct.Count);
        foreach (var l in multipole) near.Add((l, radius));
        foreach (var l in direct) near.Add((l, -1));
        AddNear(all, near, shape, phase, axis, trace);

        ArrayPool<RenderLine>.Shared.Return(all);
        if (reversed) Array.Reverse(trace);
        return trace;
    }

    /// <summary>
    /// Smooth groups (one width, enough lines, interpolation error below the tolerance on the grid or on one
    /// <see cref="MostOversampling"/> or fewer times finer) go by Lagrange deposit; pure Gaussian absorption and lines far
    /// outside the grid directly; everything else by multipoles.
    /// </summary>
    private static void Classify(ReadOnlySpan<RenderLine> lines, Lineshape shape, PhaseRotation phase, Axis axis,
        List<(LineProfile, int, List<int>)> smooth, List<int> multipole, List<int> direct)
    {
        // The most shared widths (up to SmoothGroupMost) that are smooth enough on some grid.
        var candidates = new List<(double Width, int Count, int Oversampling)>();
        foreach (var (width, count) in FrequentWidths(lines, SmoothGroupMinimum))
        {
            var oversampling = Oversampling(shape.Profile(width, tabulated: true), phase, axis.Step);
            if (oversampling > 0) candidates.Add((width, count, oversampling));
        }
        candidates.Sort((a, b) => b.Count.CompareTo(a.Count));
        var chosen = new Dictionary<double, (LineProfile Profile, int Oversampling, List<int> Lines)>();
        foreach (var (width, count, oversampling) in candidates.Take(SmoothGroupMost))
            chosen[width] = (shape.Profile(width, tabulated: true), oversampling, new List<int>(count));
        // A pure Gaussian's absorption is negligible a few widths out: it needs no far field.
        var gaussianAbsorption = shape.Kind == LineshapeKind.Gaussian && phase.Sin == 0;
        for (var l = 0; l < lines.Length; l++)
        {
            if (lines[l].Area == 0) continue;
            var u = axis.Position(lines[l].CentreHz);
            if (u < -axis.Points || u > 2.0 * axis.Points) direct.Add(l);
            else if (chosen.TryGetValue(lines[l].FwhmHz, out var group)) group.Lines.Add(l);
            else if (gaussianAbsorption) direct.Add(l);
            else multipole.Add(l);
        }
        foreach (var group in chosen.Values) smooth.Add(group);
    }

    /// <summary>
    /// The widths that at least <paramref name="minimum"/> lines share, with their counts. A first pass counts the lines in
    /// 4,096 buckets by a hash of the width: a width that <paramref name="minimum"/> lines share fills its bucket at
    /// least that far, so only the lines in such buckets are counted width by width (a dictionary of every distinct width
    /// costs far more when, as is usual, the widths are many and each is rare).
    /// </summary>
    internal static Dictionary<double, int> FrequentWidths(ReadOnlySpan<RenderLine> lines, int minimum)
    {
        var counts = new Dictionary<double, int>();
        if (lines.Length < minimum) return counts;
        const int BucketBits = 12;
        static int Bucket(double width) => (int)((ulong)BitConverter.DoubleToInt64Bits(width) * 0x9E3779B97F4A7C15UL >> (64 - BucketBits));
        Span<int> buckets = stackalloc int[1 << BucketBits];
        buckets.Clear();
        foreach (var line in lines) buckets[Bucket(line.FwhmHz)]++;
        // Runs of one width (lines of one nucleus often come together) are counted as runs.
        double run = double.NaN;
        var length = 0;
        foreach (var line in lines)
        {
            if (line.FwhmHz == run) { length++; continue; }
            if (length > 0) CollectionsMarshal.GetValueRefOrAddDefault(counts, run, out _) += length;
            (run, length) = buckets[Bucket(line.FwhmHz)] >= minimum ? (line.FwhmHz, 1) : (double.NaN, 0);
        }
        if (length > 0) CollectionsMarshal.GetValueRefOrAddDefault(counts, run, out _) += length;
        foreach (var key in counts.Keys.ToArray())
            if (counts[key] < minimum) counts.Remove(key);
        return counts;
    }

    /// <summary>Finest grid the smooth route may deposit on: this many points per grid step.</summary>
    private const int MostOversampling = 4;

    /// <summary>
    /// The fewest points per grid step at which the profile is smooth enough for the Lagrange deposit; 0 when none is.
    /// A finer grid than the trace's (2 or 4 points per step) only for a Voigt: its other route draws every line's near
    /// field from the table over 5 (half-width + 2.5 sigma) steps, which costs more than the finer transform; Lorentzian
    /// near fields (a rational function) and pure Gaussian absorption (a few sigma) are cheaper drawn directly
    /// (measured: DEVELOPERS.md, trace synthesis).
    /// </summary>
    private static int Oversampling(LineProfile profile, PhaseRotation phase, double step)
    {
        var most = profile.LorentzianFwhmHz > 0 && profile.SigmaHz > 0 ? MostOversampling : 1;
        for (var q = 1; q <= most; q *= 2)
            if (SmoothEnough(profile, phase, step / q)) return q;
        return 0;
    }

    /// <summary>Whether the 12-node Lagrange interpolant of the profile, in steps, is within the tolerance of its peak.</summary>
    private static bool SmoothEnough(LineProfile profile, PhaseRotation phase, double step)
    {
        var peak = profile.Absorption(0) * step;
        double bound = double.PositiveInfinity;
        var h = profile.LorentzianFwhmHz / 2 / step;
        if (h > 0) bound = LagrangeProductBound / (Math.PI * Math.Pow(h, LagrangeNodes + 1));
        var sigma = profile.SigmaHz / step;
        // The dispersion of a Gaussian component is not covered by Cramér's bound: only absorption uses it.
        if (sigma > 0 && phase.Sin == 0)
            bound = Math.Min(bound, LagrangeProductBound * 1.09 / Math.Sqrt(Factorial(LagrangeNodes)) / Math.Pow(sigma, LagrangeNodes)
                / (sigma * Math.Sqrt(2 * Math.PI)));
        return bound <= Tolerance * peak;
    }

    private static double Factorial(int n) => n <= 1 ? 1 : n * Factorial(n - 1);

    /// <summary>The near radius, in steps, that a line needs for its far field to be held by <see cref="Terms"/> multipoles.</summary>
    private static int FarRadius(LineProfile profile, double step)
    {
        var h = profile.LorentzianFwhmHz / 2 / step;
        var sigma = profile.SigmaHz / step;
        var reach = Math.Sqrt(0.25 + h * h) + 2.5 * sigma;
        return Math.Max(MinimumRadius, 8 * (int)Math.Ceiling(RadiusPerReach * reach / 8));
    }

    /// <summary>
    /// The transforms of 1/d^(K+1) for |d| &gt; R (0 within), K = 0 .. Terms - 1, on the circular layout of length n: for
    /// even K the kernel is odd and its transform i t_K, for odd K it is even and its transform t_K. Returned per term
    /// pair p (K = 2p, 2p + 1) as alpha = (t_K - t_(K+1)) / 2 and beta = (t_K + t_(K+1)) / 2 at frequencies 0 .. n/2, the
    /// form <see cref="AddFarFields"/> uses. The last sets are kept: a run of similar spectra reuses them.
    /// </summary>
    private static double[][] FarKernels(int n, int radius)
    {
        lock (CacheLock)
            foreach (var cached in FarKernelCache)
                if (cached.N == n && cached.Radius == radius) return cached.Transforms;
        var transforms = new double[Terms][];
        Parallel.For(0, Terms / 2, pair =>
        {
            var k = 2 * pair;
            var buffer = AlignedComplexArray.Rent(n);
            var z = buffer.Span;
            for (var d = radius + 1; d < n / 2; d++)
            {
                var inverse = 1.0 / d;
                var odd = inverse;
                for (var p = 0; p < k; p++) odd *= inverse;
                var even = odd * inverse;
                z[d] = new Complex(odd, even);
                z[n - d] = new Complex(-odd, even);
            }
            Fft.Forward(z);
            var alpha = new double[n / 2 + 1];
            var beta = new double[n / 2 + 1];
            for (var i = 0; i <= n / 2; i++)
            {
                var mirror = z[(n - i) & (n - 1)];
                // Z = i t_K + i t_(K+1) is imaginary, t_K odd in the frequency index and t_(K+1) even.
                var (odd, even) = (0.5 * (z[i].Imaginary - mirror.Imaginary), 0.5 * (z[i].Imaginary + mirror.Imaginary));
                (alpha[i], beta[i]) = (0.5 * (odd - even), 0.5 * (odd + even));
            }
            transforms[k] = alpha;
            transforms[k + 1] = beta;
            buffer.Return();
        });
        lock (CacheLock)
        {
            if (FarKernelCache.Count >= 3) FarKernelCache.RemoveAt(0);
            FarKernelCache.Add((n, radius, transforms));
        }
        return transforms;
    }

    /// <summary>
    /// The moment deposits Re[c m_K] (c = e^(i phi) i / (pi s), times the area) of every line at its node, for K = 0 ..
    /// Terms - 1, packed two terms (K even, K + 1) to one complex array.
    /// </summary>
    private static unsafe AlignedComplexArray[] FarDeposits(RenderLine[] lines, List<int> members, Lineshape shape, PhaseRotation phase, Axis axis, int n)
    {
        var deposits = new AlignedComplexArray[Terms / 2];
        var c = new Complex(phase.Cos, phase.Sin) * Complex.ImaginaryOne / (Math.PI * axis.Step);
        // One thread: with the lines in position order the writes run along the arrays, and a second thread (each
        // writing half the arrays) measured slower (6 against 5 ms for 100,000 lines).
        var targets = new nint[deposits.Length];
        for (var p = 0; p < deposits.Length; p++) targets[p] = (nint)(deposits[p] = AlignedComplexArray.Rent(n)).Pointer;
        Span<double> values = stackalloc double[Terms];
        // Both components scale with the width (Lineshape.Components): per Hz of width, in steps.
        var unit = shape.Profile(1.0);
        var (halfPerWidth, sigmaPerWidth) = (unit.LorentzianFwhmHz / 2 / axis.Step, unit.SigmaHz / axis.Step);
        foreach (var l in members)
        {
            var line = lines[l];
            var (half, sigma) = (line.FwhmHz * halfPerWidth, line.FwhmHz * sigmaPerWidth);
            var u = axis.Position(line.CentreHz);
            var node = Math.Round(u);
            DepositValues(u - node, half, sigma * sigma, c * line.Area, values);
            var slot = (int)((long)node & (n - 1));
            for (var p = 0; p < targets.Length; p++)
                ((Complex*)targets[p])[slot] += new Complex(values[2 * p], values[2 * p + 1]);
        }
        return deposits;
    }

    /// <summary>
    /// Adds to the spectrum the far fields of every term from the transformed packed deposits Z_p: pair p holds terms
    /// K = 2p (kernel odd, transform i t_K) and K + 1 (kernel even, transform t_(K+1)), separated by conjugate symmetry
    /// (<see cref="Unpack"/>). With W = conj Z_p[-k], the pair adds i t_K (Z + W) / 2 - i t_(K+1) (Z - W) / 2 =
    /// i (alpha_k Z_p[k] + beta_k W); since t_K is odd in k and t_(K+1) even, alpha_(-k) = -beta_k and beta_(-k) = -alpha_k,
    /// so the sum at -k is the conjugate of that at k (the far field is real): both come from the kernels' first half.
    /// One pass, in parallel ranges; each frequency sums the pairs in order, so the result does not depend on the threads.
    /// </summary>
    private static unsafe void AddFarFields(AlignedComplexArray[] deposits, double[][] kernels, AlignedComplexArray spectrum)
    {
        var n = spectrum.Length;
        var (pairs, sum) = (deposits.Select(d => (nint)d.Pointer).ToArray(), (nint)spectrum.Pointer);
        var half = n / 2;
        var ranges = Math.Min(Environment.ProcessorCount, Math.Max(1, n / 8192));
        Parallel.For(0, ranges, new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount }, r =>
        {
            var output = (Complex*)sum;
            for (var k = (int)((long)(half + 1) * r / ranges); k < (int)((long)(half + 1) * (r + 1) / ranges); k++)
            {
                var m = (n - k) & (n - 1);
                double re = 0, im = 0;
                for (var p = 0; p < pairs.Length; p++)
                {
                    var z = (Complex*)pairs[p];
                    double alpha = kernels[2 * p][k], beta = kernels[2 * p + 1][k];
                    // alpha Z[k] + beta conj Z[m].
                    re += alpha * z[k].Real + beta * z[m].Real;
                    im += alpha * z[k].Imaginary - beta * z[m].Imaginary;
                }
                // i (re + i im) at k; at -k, -i (beta Z[m] + alpha conj Z[k]) = -i conj(re + i im), its conjugate: the far
                // field is real.
                output[k] += new Complex(-im, re);
                if (m != k) output[m] += new Complex(-im, -re);
            }
        });
    }

    /// <summary>
    /// The transforms, at frequency <paramref name="k"/>, of two real sequences packed as the real and imaginary parts of
    /// one complex sequence whose transform is <paramref name="z"/> (<paramref name="mirror"/> = -k mod n): conjugate
    /// symmetry separates them, X = (Z[k] + conj Z[-k]) / 2 and Y = (Z[k] - conj Z[-k]) / 2i.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (Complex Real, Complex Imaginary) Unpack(ReadOnlySpan<Complex> z, int k, int mirror)
    {
        var conjugate = Complex.Conjugate(z[mirror]);
        return (0.5 * (z[k] + conjugate), (z[k] - conjugate) * new Complex(0, -0.5));
    }

    /// <summary>
    /// The deposits Re[scale m_K] for K = 0 .. values.Length - 1, where m_K = E[(w + g)^K], w = offset - i half and g normal
    /// of the given variance: m_0 = 1, m_1 = w, m_(K+1) = w m_K + K variance m_(K-1) (Stein's identity); in real arithmetic.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void DepositValues(double offset, double half, double variance, Complex scale, Span<double> values)
    {
        var (sr, si) = (scale.Real, scale.Imaginary);
        var (lastRe, lastIm, re, im) = (1.0, 0.0, offset, -half);
        values[0] = sr;
        values[1] = sr * re - si * im;
        for (var k = 1; k < values.Length - 1; k++)
        {
            var nextRe = offset * re + half * im + k * variance * lastRe;
            var nextIm = offset * im - half * re + k * variance * lastIm;
            (lastRe, lastIm, re, im) = (re, im, nextRe, nextIm);
            values[k + 1] = sr * re - si * im;
        }
    }

    /// <summary>
    /// Adds to <paramref name="sum"/> the transform of one width's Lagrange deposits convolved with its sampled profile,
    /// on a grid <paramref name="oversampling"/> times finer than the trace's (of nq = n q points). The trace takes every
    /// q-th point of that convolution, whose transform folds the fine one: C[k] = (1/q) sum_m F[k + m n].
    /// </summary>
    private static void AddSmooth(RenderLine[] lines, List<int> members, LineProfile profile, int oversampling, PhaseRotation phase, Axis axis, int n, AlignedComplexArray spectrum)
    {
        var nq = n * oversampling;
        var fineStep = axis.Step / oversampling;
        // Deposits in the real part, the profile at every distance in the imaginary part: one transform for both.
        var buffer = AlignedComplexArray.Rent(nq);
        var z = buffer.Span;
        var sum = spectrum.Span;
        Span<double> weights = stackalloc double[LagrangeNodes];
        foreach (var l in members)
        {
            var u = axis.Position(lines[l].CentreHz) * oversampling;
            var node = Math.Floor(u);
            LagrangeWeights(u - node, weights);
            var start = (long)node - LagrangeNodes / 2 + 1;
            for (var k = 0; k < LagrangeNodes; k++)
            {
                var slot = (int)((start + k) & (nq - 1));
                z[slot] = new Complex(z[slot].Real + lines[l].Area * weights[k], 0);
            }
        }
        // The profile at distances -nq/2 .. nq/2 - 1 fine steps, drawn as one line's near field (vectorised where it can be).
        var sampled = ArrayPool<double>.Shared.Rent(nq);
        Array.Clear(sampled, 0, nq);
        profile.AddPhased(sampled.AsSpan(0, nq), -nq / 2 * fineStep, fineStep, 1, phase);
        for (var i = 0; i < nq; i++)
        {
            var slot = (i - nq / 2) & (nq - 1);
            z[slot] = new Complex(z[slot].Real, sampled[i]);
        }
        ArrayPool<double>.Shared.Return(sampled);
        Fft.Forward(z);
        var fold = 1.0 / oversampling;
        for (var k = 0; k < n; k++)
        {
            var total = Complex.Zero;
            for (var m = k; m < nq; m += n)
            {
                var (deposits, kernel) = Unpack(z, m, (nq - m) & (nq - 1));
                total += deposits * kernel;
            }
            sum[k] += fold * total;
        }
        buffer.Return();
    }

    /// <summary>Lagrange weights of the nodes -5 .. 6 for a point at <paramref name="t"/> in [0, 1).</summary>
    private static void LagrangeWeights(double t, Span<double> weights)
    {
        const int offset = LagrangeNodes / 2 - 1;
        for (var k = 0; k < LagrangeNodes; k++)
        {
            double w = 1;
            var xk = k - offset;
            for (var j = 0; j < LagrangeNodes; j++)
                if (j != k) w *= (t - (j - offset)) / (xk - (j - offset));
            weights[k] = w;
        }
    }

    /// <summary>
    /// Adds each line directly within its radius of its node (radius -1: at every point of the grid; pure Gaussian
    /// absorption: where it exceeds 1e-15 of its peak).
    /// </summary>
    private static void AddNear(RenderLine[] lines, List<(int Line, int Radius)> near, Lineshape shape, PhaseRotation phase, Axis axis, double[] trace)
    {
        if (near.Count == 0) return;
        var cumulative = new long[near.Count + 1];
        for (var i = 0; i < near.Count; i++)
        {
            var (first, last) = Window(lines[near[i].Line], near[i].Radius, shape, phase, axis);
            cumulative[i + 1] = cumulative[i] + Math.Max(0, last - first + 1);
        }
        var work = cumulative[^1];
        var threads = (int)Math.Clamp(work / ParallelThresholdEvaluations, 1, Environment.ProcessorCount);
        var bounds = new int[threads + 1];
        for (var t = 1; t < threads; t++)
        {
            var at = Array.BinarySearch(cumulative, work * t / threads);
            bounds[t] = at >= 0 ? at : ~at;
        }
        bounds[threads] = near.Count;
        var buffers = new double[threads][];
        Parallel.For(0, threads, new ParallelOptions { MaxDegreeOfParallelism = threads }, t =>
        {
            // The other threads' buffers from the pool (a fresh one costs its page faults on every trace).
            if (t > 0)
            {
                buffers[t] = ArrayPool<double>.Shared.Rent(trace.Length);
                Array.Clear(buffers[t], 0, trace.Length);
            }
            var buffer = t == 0 ? trace : buffers[t];
            for (var i = bounds[t]; i < bounds[t + 1]; i++)
            {
                var line = lines[near[i].Line];
                var (first, last) = Window(line, near[i].Radius, shape, phase, axis);
                var profile = shape.Profile(line.FwhmHz, tabulated: true);
                if (last >= first)
                    profile.AddPhased(buffer.AsSpan(first, last - first + 1), axis.FirstHz - line.CentreHz + first * axis.Step, axis.Step, line.Area, phase);
            }
        });
        for (var t = 1; t < threads; t++)
        {
            var buffer = buffers[t];
            for (var i = 0; i < trace.Length; i++) trace[i] += buffer[i];
            ArrayPool<double>.Shared.Return(buffer);
        }
    }

    private static (int First, int Last) Window(RenderLine line, int radius, Lineshape shape, PhaseRotation phase, Axis axis)
    {
        var u = axis.Position(line.CentreHz);
        double low, high;
        if (radius >= 0)
        {
            var node = Math.Round(u);
            (low, high) = (node - radius, node + radius);
        }
        else
        {
            var profile = shape.Profile(line.FwhmHz);
            // exp(-x^2 / 2) < 1e-15 beyond x = 8.3: a Gaussian holds less than 1e-15 of its area there (its dispersion,
            // drawn with a phase error, falls only as 1/x: everywhere then).
            var reach = profile.IsGaussian && phase.Sin == 0 ? 8.3 * profile.SigmaHz / axis.Step : double.PositiveInfinity;
            (low, high) = (Math.Ceiling(u - reach), Math.Floor(u + reach));
        }
        low = Math.Max(low, 0);
        high = Math.Min(high, axis.Points - 1);
        return low > high ? (1, 0) : ((int)low, (int)high);
    }

    /// <summary>
    /// The lines sorted by their grid position, by a counting sort on the whole step they fall in (lines beyond the grid
    /// and its neighbours counted at its ends); within a step in their given order, so the order is always the same.
    /// The array comes from the shared pool (its first lines.Length entries are the lines) and goes back at the end of
    /// the drawing, as does the sort's count array: fresh large arrays cost more than the sort on a small machine.
    /// </summary>
    private static RenderLine[] InPositionOrder(ReadOnlySpan<RenderLine> lines, Axis axis)
    {
        var buckets = 3 * axis.Points + 2;
        int Bucket(RenderLine line) => (int)Math.Clamp(Math.Floor(axis.Position(line.CentreHz)) + axis.Points + 1, 0, buckets - 1);
        var starts = ArrayPool<int>.Shared.Rent(buckets + 1);
        Array.Clear(starts, 0, buckets + 1);
        foreach (var line in lines) starts[Bucket(line) + 1]++;
        for (var b = 0; b < buckets; b++) starts[b + 1] += starts[b];
        var sorted = ArrayPool<RenderLine>.Shared.Rent(lines.Length);
        foreach (var line in lines) sorted[starts[Bucket(line)]++] = line;
        ArrayPool<int>.Shared.Return(starts);
        return sorted;
    }

    private static void Validate(ReadOnlySpan<RenderLine> lines)
    {
        for (int i = 0; i < lines.Length; i++)
        {
            var line = lines[i];
            if (!double.IsFinite(line.CentreHz) || !double.IsFinite(line.Area))
                throw new ArgumentException($"line {i}: centre {line.CentreHz} Hz and area {line.Area} must be finite", nameof(lines));
            if (!(line.FwhmHz > 0) || !double.IsFinite(line.FwhmHz))
                throw new ArgumentException($"line {i}: width {line.FwhmHz} Hz must be positive and finite", nameof(lines));
        }
    }

    /// <summary>Grid points as Hz, ascending: FirstHz + j Step.</summary>
    private readonly record struct Axis(double FirstHz, double Step, int Points)
    {
        /// <summary>A frequency in steps from the first point.</summary>
        public double Position(double hz) => (hz - FirstHz) / Step;
    }
}
