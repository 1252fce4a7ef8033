namespace SpinSim.Core.Engine;

/// <summary>
/// One observed transition. <see cref="Origin"/> has one weight per nucleus entry of the system (zero for
/// unobserved ones) saying how much of the spin flip happens on that entry: the change of its expected Iz
/// between the two eigenstates, clipped at zero and normalised to sum 1.
/// </summary>
public sealed record Line(double FrequencyHz, double ShiftPpm, double Intensity, double[] Origin)
{
    /// <summary>Indices of entries that carry at least <paramref name="share"/> of the flip, largest first.</summary>
    public IEnumerable<int> DominantEntries(double share = 0.25) =>
        Origin.Select((w, i) => (w, i)).Where(t => t.w >= share).OrderByDescending(t => t.w).Select(t => t.i);
}

/// <summary>The result of the engine: the observed lines and what it cost to get them.</summary>
public sealed record LineList(
    IReadOnlyList<Line> Lines,
    double ObserveMHz,
    double ExpectedTotalIntensity,
    double DroppedIntensity,
    int LargestBlock,
    int Blocks,
    string Backend,
    IReadOnlyList<string> Notes)
{
    public double TotalIntensity => Lines.Sum(l => l.Intensity);
}
