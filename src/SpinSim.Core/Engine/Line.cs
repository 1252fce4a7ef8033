namespace SpinSim.Core.Engine;

/// <summary>One observed transition: frequency relative to 0 ppm of the observed nucleus, and intensity.</summary>
public readonly record struct Line(double FrequencyHz, double ShiftPpm, double Intensity);

/// <summary>
/// The result of the engine: the observed lines, sorted by frequency, and what it cost to get them. For every line the
/// list also holds its origin: one weight per nucleus entry of the system (zero for unobserved entries) saying how much
/// of the spin flip happens on that entry, i.e. the change of its expected Iz between the two eigenstates. The weights
/// of a line sum to 1; in strongly coupled systems single weights may be slightly negative.
/// </summary>
public sealed class LineList
{
    private readonly double[] _origin;

    public LineList(Line[] lines, double[] originWeights, int entryCount, double observeMHz, double expectedTotalIntensity,
        int largestBlock, int blocks, string backend, IReadOnlyList<string> notes)
    {
        if (originWeights.Length != lines.Length * entryCount)
            throw new ArgumentException("origin weights must hold one row of entryCount weights per line", nameof(originWeights));
        Lines = lines;
        _origin = originWeights;
        EntryCount = entryCount;
        ObserveMHz = observeMHz;
        ExpectedTotalIntensity = expectedTotalIntensity;
        LargestBlock = largestBlock;
        Blocks = blocks;
        Backend = backend;
        Notes = notes;
        TotalIntensity = lines.Sum(l => l.Intensity);
    }

    public IReadOnlyList<Line> Lines { get; }
    public int EntryCount { get; }
    public double ObserveMHz { get; }

    /// <summary>Tr(F+ F-): what the intensities sum to before any line is dropped.</summary>
    public double ExpectedTotalIntensity { get; }

    public double TotalIntensity { get; }

    /// <summary>Intensity missing from the list: transitions taken as numerically zero, and rounding.</summary>
    public double DroppedIntensity => Math.Max(0, ExpectedTotalIntensity - TotalIntensity);

    /// <summary>How many of the lines are pools of lines below the engine's floor (see <see cref="EngineOptions.RelativeIntensityFloor"/>).</summary>
    public int PooledLines { get; init; }

    /// <summary>Derivatives of the lines by shifts and couplings, when they were asked for (<see cref="SpectrumEngine.ComputeWithDerivatives"/>).</summary>
    public LineDerivatives? Derivatives { get; init; }

    public int LargestBlock { get; }
    public int Blocks { get; }
    public string Backend { get; }
    public IReadOnlyList<string> Notes { get; }

    /// <summary>Origin weights of line <paramref name="line"/>, one per entry, summing to 1.</summary>
    public ReadOnlySpan<double> OriginOf(int line) => _origin.AsSpan(line * EntryCount, EntryCount);

    /// <summary>
    /// Intensity-weighted mean of <paramref name="perEntry"/> over the entries that flip in line <paramref name="line"/>
    /// (negative origin weights clipped at zero): how a line of mixed origin inherits a width.
    /// </summary>
    public double WeightedByOrigin(int line, ReadOnlySpan<double> perEntry)
    {
        var origin = OriginOf(line);
        double sum = 0, weight = 0;
        for (var e = 0; e < EntryCount; e++)
        {
            var w = Math.Max(0, origin[e]);
            sum += w * perEntry[e];
            weight += w;
        }
        if (weight > 0) return sum / weight;
        for (var e = 0; e < EntryCount; e++) if (origin[e] != 0) return perEntry[e];
        return perEntry[0];
    }

    /// <summary>Entries that carry at least <paramref name="share"/> of the flip of line <paramref name="line"/>, largest first.</summary>
    public IReadOnlyList<int> DominantEntries(int line, double share = 0.25)
    {
        var origin = OriginOf(line).ToArray();
        return Enumerable.Range(0, EntryCount).Where(e => origin[e] >= share).OrderByDescending(e => origin[e]).ToArray();
    }
}
