using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;

namespace SpinSim.Core.Planning;

/// <summary>
/// A part of a spin system followed from field to field: the observed entries joined to each other by homonuclear
/// couplings, directly or through a chain (a connected component of the observed isotope's coupling network).
/// </summary>
/// <param name="Number">1, 2, ... in the order of the system's first entry in each cluster.</param>
/// <param name="Entries">Indices of the system's entries, ascending.</param>
/// <param name="Ids">The entries' ids, in the same order.</param>
public sealed record FieldCluster(int Number, IReadOnlyList<int> Entries, IReadOnlyList<string> Ids)
{
    public string Label => string.Join(", ", Ids);
}

/// <summary>How far from first order one cluster is at one field.</summary>
/// <param name="MinDeltaNuOverJ">Smallest |delta nu| / |J| over the cluster's coupled pairs of different shift (delta nu = delta ppm x field);
/// null when every coupled pair has equal shifts, so that no field changes the pattern.</param>
/// <param name="ClosestPair">Ids of the pair that sets <paramref name="MinDeltaNuOverJ"/>.</param>
/// <param name="FirstOrderDeviation">sqrt(sum (exact - first)^2 / sum exact^2) over the cluster's lines, 0 for a first-order pattern.</param>
/// <param name="ResolvedLines">Lines of the exact trace told apart by <see cref="Planning.ResolvedLines"/>.</param>
public sealed record ClusterAtField(FieldCluster Cluster, double? MinDeltaNuOverJ, (string A, string B)? ClosestPair,
    double FirstOrderDeviation, int ResolvedLines);

/// <summary>The system at one field: every cluster's measures, and the exact lines (for a figure).</summary>
public sealed record FieldPoint(FieldMHz Field, IReadOnlyList<ClusterAtField> Clusters, LineList Lines);

/// <summary>What the search for the lowest first-order field found.</summary>
public enum FirstOrderReach
{
    /// <summary>Between two fields: <see cref="LowestFirstOrderField.Within"/> is within tolerance, <see cref="LowestFirstOrderField.Outside"/> just below it is not.</summary>
    Bracketed,

    /// <summary>Already within tolerance at the lowest field tried; the true limit may be lower.</summary>
    AtOrBelowLowestField,

    /// <summary>
    /// Not within tolerance at the largest field tried, but within it in the high-field limit. The search goes on past
    /// the list towards that limit, so <see cref="LowestFirstOrderField.Within"/> says how far above the list (often a
    /// field no magnet reaches).
    /// </summary>
    AboveLargestField,

    /// <summary>Not within tolerance even in the high-field limit (magnetically inequivalent nuclei, such as AA'XX', stay second order).</summary>
    NotAtAnyField,
}

/// <summary>The lowest field at which a cluster is within tolerance of first order, as far as the search can tell.</summary>
/// <param name="Within">Lowest field found within tolerance; for <see cref="FirstOrderReach.AboveLargestField"/> one found past the list; null for <see cref="FirstOrderReach.NotAtAnyField"/>.</param>
/// <param name="DeviationWithin">Deviation at <paramref name="Within"/>.</param>
/// <param name="Outside">Highest field found outside tolerance: just below <paramref name="Within"/>, or for <see cref="FirstOrderReach.NotAtAnyField"/> the largest field tried; null for <see cref="FirstOrderReach.AtOrBelowLowestField"/>.</param>
/// <param name="DeviationOutside">Deviation at <paramref name="Outside"/>.</param>
/// <param name="HighFieldLimitDeviation">Deviation where |delta nu| / |J| is <see cref="FieldPlanner.LimitRatio"/>, computed only when the largest field tried is outside tolerance.</param>
public sealed record LowestFirstOrderField(FieldCluster Cluster, FirstOrderReach Reach, FieldMHz? Within, double? DeviationWithin,
    FieldMHz? Outside, double? DeviationOutside, double? HighFieldLimitDeviation);

/// <summary>How the planner renders and judges spectra.</summary>
/// <param name="DefaultWidth">FWHM of lines whose nuclei state no width of their own.</param>
/// <param name="Shape">Lineshape of both the exact and the first-order trace.</param>
/// <param name="Tolerance">Largest first-order deviation counted as first order, above 0.</param>
/// <param name="FieldPrecision">The search stops when the bracketing fields differ by this factor minus 1 (0.005: half a percent).</param>
public sealed record FieldPlanSettings(WidthHz DefaultWidth, Lineshape Shape, double Tolerance = FieldPlanSettings.DefaultTolerance,
    double FieldPrecision = 0.005)
{
    public const double DefaultTolerance = 0.05;

    /// <summary>From a 43 MHz benchtop magnet to an 800 MHz instrument (common practice, no source).</summary>
    public static IReadOnlyList<FieldMHz> DefaultFields { get; } =
        new double[] { 43, 60, 80, 100, 200, 300, 400, 500, 600, 800 }.Select(f => new FieldMHz(f)).ToArray();
}

/// <summary>Everything the planner found: clusters, per-field measures in increasing field, and per-cluster lowest fields.</summary>
public sealed record FieldPlan(IReadOnlyList<FieldCluster> Clusters, IReadOnlyList<FieldPoint> Fields,
    IReadOnlyList<LowestFirstOrderField> LowestFields, FieldPlanSettings Settings);

/// <summary>
/// Plans the field for a spin system: simulates it at several fields and says, per cluster, how far the exact
/// spectrum is from the first-order one, how many lines one would resolve, and from which field on the pattern
/// is first order within a tolerance.
/// </summary>
/// <remarks>
/// <para>Clusters are the connected components of the observed isotope's homonuclear coupling network (every
/// nonzero J counts). They do not depend on the field, so a cluster keeps its number from field to field, and no
/// threshold has to be chosen: second-order effects of even a weak coupling are measured inside one cluster, and the
/// pair that sets <see cref="ClusterAtField.MinDeltaNuOverJ"/> is named. Entries with no homonuclear coupling are not
/// reported: with heteronuclear couplings as J Iz Iz they are first order at every field (unless their unobserved
/// partners are strongly coupled to each other, which this planner does not single out).</para>
/// <para>The exact spectrum is exact for the Hamiltonian SpinSim uses: the engine diagonalises every homonuclear
/// component as one, with heteronuclear partners as fixed Iz states, which is no approximation there. The lines of a
/// cluster are the engine's lines weighted by the share of their origin on the cluster's entries.</para>
/// <para>The deviation compares the two traces on a grid of <see cref="PointsPerFwhm"/> points per narrowest linewidth
/// covering +-<see cref="RegionFwhm"/> FWHM about every line of either spectrum, and nothing else: between far apart
/// multiplets both traces are negligible. The first-order areas are scaled so that both traces hold the same total.</para>
/// <para>The lowest-field search assumes the deviation falls monotonically with field between neighbouring fields of
/// the list. It takes the lowest listed field from which on every listed field is within tolerance and bisects, in
/// log field, between it and the listed field below it until they differ by <see cref="FieldPlanSettings.FieldPrecision"/>.
/// When even the largest listed field is outside tolerance, the deviation is computed in the high-field limit (where the
/// smallest |delta nu| / |J| is <see cref="LimitRatio"/>): if that is outside too, no field helps; otherwise the same
/// bisection runs between the largest listed field and the limit.</para>
/// </remarks>
public static class FieldPlanner
{
    /// <summary>Half-width of the compared region about each line, in FWHM: a squared Lorentzian holds all but 7e-6 of its weight within it.</summary>
    public const double RegionFwhm = 20;

    /// <summary>Grid points per FWHM of the narrowest line: enough that sums over the grid stand for integrals and dips are seen.</summary>
    public const int PointsPerFwhm = 16;

    /// <summary>|delta nu| / |J| taken as the high-field limit: first-order corrections scale as |J| / |delta nu|, so 1e-4 of the pattern is left.</summary>
    public const double LimitRatio = 1e4;

    /// <summary>Split at any nonzero |J / delta nu|: each homonuclear component is diagonalised whole, which is exact (see remarks).</summary>
    private static readonly EngineOptions ExactByComponents = EngineOptions.Default with
    {
        Splitting = ClusterSplitting.Split,
        WeakCouplingRatio = double.Epsilon,
    };

    /// <summary>Clusters of <paramref name="system"/>: homonuclear components of observed entries with at least one coupling.</summary>
    public static IReadOnlyList<FieldCluster> Clusters(SpinSystem system)
    {
        ArgumentNullException.ThrowIfNull(system);
        var n = system.Nuclei.Count;
        var j = system.CouplingMatrixHz();
        var parent = Enumerable.Range(0, n).ToArray();
        int Find(int x) => parent[x] == x ? x : parent[x] = Find(parent[x]);
        for (var a = 0; a < n; a++)
            for (var b = a + 1; b < n; b++)
                if (j[a, b] != 0 && IsObserved(system, a) && IsObserved(system, b)) parent[Find(a)] = Find(b);

        var clusters = new List<FieldCluster>();
        foreach (var group in Enumerable.Range(0, n).Where(e => IsObserved(system, e)).GroupBy(Find))
        {
            var entries = group.Order().ToArray();
            if (entries.Length < 2) continue;
            clusters.Add(new FieldCluster(clusters.Count + 1, entries, entries.Select(e => system.Nuclei[e].Id).ToArray()));
        }
        return clusters;
    }

    /// <summary>Simulates <paramref name="system"/> at each field and searches each cluster's lowest first-order field.</summary>
    /// <param name="fields">Fields to report, any order; duplicates are reported once.</param>
    /// <exception cref="ArgumentException">No fields, a field that is not finite and positive, or invalid settings.</exception>
    /// <exception cref="SystemTooLargeException">A cluster too large to diagonalise within the engine's memory budget.</exception>
    public static FieldPlan Plan(SpinSystem system, IReadOnlyList<FieldMHz> fields, FieldPlanSettings settings, CancellationToken cancel = default)
    {
        ArgumentNullException.ThrowIfNull(system);
        ArgumentNullException.ThrowIfNull(fields);
        Validate(settings);
        if (fields.Count == 0) throw new ArgumentException("give at least one field", nameof(fields));
        foreach (var f in fields)
            if (!(f.Value > 0) || !double.IsFinite(f.Value))
                throw new ArgumentException($"fields must be finite and above 0 MHz, got {f.Value}", nameof(fields));

        var clusters = Clusters(system);
        var cache = new Dictionary<double, FieldPoint>();
        FieldPoint At(double mhz)
        {
            if (!cache.TryGetValue(mhz, out var point))
                cache[mhz] = point = Evaluate(system, new FieldMHz(mhz), clusters, settings, cancel);
            return point;
        }

        var listed = fields.Select(f => f.Value).Distinct().Order().ToArray();
        var points = listed.Select(At).ToArray();
        var lowest = clusters.Select((c, k) => LowestField(c, k, listed, At, settings)).ToArray();
        return new FieldPlan(clusters, points, lowest, settings);
    }

    /// <summary>Every cluster of <paramref name="system"/> at one field.</summary>
    public static FieldPoint Evaluate(SpinSystem system, FieldMHz field, FieldPlanSettings settings, CancellationToken cancel = default)
    {
        ArgumentNullException.ThrowIfNull(system);
        Validate(settings);
        return Evaluate(system, field, Clusters(system), settings, cancel);
    }

    private static FieldPoint Evaluate(SpinSystem system, FieldMHz field, IReadOnlyList<FieldCluster> clusters, FieldPlanSettings settings,
        CancellationToken cancel)
    {
        var atField = system.WithField(field);
        var lines = SpectrumEngine.Compute(atField, ExactByComponents, cancel);
        var exact = SpectrumSimulator.RenderLines(atField, lines, settings.DefaultWidth);
        var measures = clusters.Select(c =>
        {
            var (ratio, pair) = MinDeltaNuOverJ(atField, c);
            var (deviation, resolved) = Compare(atField, lines, exact, c, settings);
            return new ClusterAtField(c, ratio, pair, deviation, resolved);
        }).ToArray();
        return new FieldPoint(field, measures, lines);
    }

    /// <summary>Smallest |delta nu| / |J| over the coupled pairs of different shift in <paramref name="cluster"/>, and the pair.</summary>
    public static (double? Ratio, (string A, string B)? Pair) MinDeltaNuOverJ(SpinSystem system, FieldCluster cluster)
    {
        var j = system.CouplingMatrixHz();
        double? best = null;
        (string, string)? pair = null;
        var entries = cluster.Entries;
        for (var p = 0; p < entries.Count; p++)
            for (var q = p + 1; q < entries.Count; q++)
            {
                var (a, b) = (entries[p], entries[q]);
                var dnu = Math.Abs(system.FrequencyHz(a) - system.FrequencyHz(b));
                if (j[a, b] == 0 || dnu == 0) continue;
                var ratio = dnu / Math.Abs(j[a, b]);
                if (best is null || ratio < best)
                {
                    best = ratio;
                    pair = (system.Nuclei[a].Id, system.Nuclei[b].Id);
                }
            }
        return (best, pair);
    }

    /// <summary>First-order deviation and resolved lines of one cluster; <paramref name="exact"/> are all the engine's lines as areas.</summary>
    private static (double Deviation, int Resolved) Compare(SpinSystem system, LineList lines, RenderLine[] exact, FieldCluster cluster,
        FieldPlanSettings settings)
    {
        var own = new List<RenderLine>();
        for (var i = 0; i < exact.Length; i++)
        {
            var origin = lines.OriginOf(i);
            double share = 0;
            foreach (var e in cluster.Entries) share += origin[e];
            // Lines of other clusters have no origin here; a coincidence of lines from two clusters is split by share.
            if (Math.Abs(share) > 1e-12) own.Add(exact[i] with { Area = exact[i].Area * share });
        }
        var firstLines = FirstOrderSpectrum.Compute(system, cluster.Entries.ToArray());
        var first = SpectrumSimulator.RenderLines(system, firstLines, settings.DefaultWidth);
        var exactTotal = own.Sum(l => l.Area);
        var firstTotal = first.Sum(l => l.Area);
        if (firstTotal > 0)
            for (var i = 0; i < first.Length; i++) first[i] = first[i] with { Area = first[i].Area * exactTotal / firstTotal };

        var all = own.Concat(first).ToArray();
        var step = all.Min(l => l.FwhmHz) / PointsPerFwhm;
        var observeMHz = lines.ObserveMHz;
        double sumSquares = 0, sumDifference = 0;
        var trace = new List<double>();
        foreach (var (from, to) in Regions(all))
        {
            var points = (int)Math.Ceiling((to - from) / step) + 1;
            var grid = new SpectrumGrid(from / observeMHz, (from + (points - 1) * step) / observeMHz, points, observeMHz);
            var e = TraceSynthesizer.Render(own.ToArray(), grid, settings.Shape);
            var f = TraceSynthesizer.Render(first, grid, settings.Shape);
            for (var i = 0; i < points; i++)
            {
                sumSquares += e[i] * e[i];
                sumDifference += (e[i] - f[i]) * (e[i] - f[i]);
            }
            // A gap between regions is a dip to nothing: lines on either side of it are resolved.
            if (trace.Count > 0) trace.Add(0);
            trace.AddRange(e);
        }
        var deviation = sumSquares > 0 ? Math.Sqrt(sumDifference / sumSquares) : 0;
        return (deviation, ResolvedLines.Count(trace.ToArray()));
    }

    /// <summary>Union of +-RegionFwhm FWHM about every line, as ascending intervals in Hz.</summary>
    private static List<(double FromHz, double ToHz)> Regions(IEnumerable<RenderLine> lines)
    {
        var intervals = lines.Select(l => (From: l.CentreHz - RegionFwhm * l.FwhmHz, To: l.CentreHz + RegionFwhm * l.FwhmHz))
            .OrderBy(i => i.From).ToList();
        var merged = new List<(double, double)>();
        foreach (var (from, to) in intervals)
        {
            if (merged.Count > 0 && from <= merged[^1].Item2) merged[^1] = (merged[^1].Item1, Math.Max(merged[^1].Item2, to));
            else merged.Add((from, to));
        }
        return merged;
    }

    private static LowestFirstOrderField LowestField(FieldCluster cluster, int index, double[] listed, Func<double, FieldPoint> at,
        FieldPlanSettings settings)
    {
        double Deviation(double mhz) => at(mhz).Clusters[index].FirstOrderDeviation;
        var tolerance = settings.Tolerance;

        // The lowest listed field from which on every listed field is within tolerance.
        var from = listed.Length;
        while (from > 0 && Deviation(listed[from - 1]) <= tolerance) from--;

        if (from == 0)
            return new(cluster, FirstOrderReach.AtOrBelowLowestField, new FieldMHz(listed[0]), Deviation(listed[0]), null, null, null);

        if (from == listed.Length)
        {
            var largest = listed[^1];
            var ratio = at(largest).Clusters[index].MinDeltaNuOverJ;
            // The deviation of a cluster without pairs of different shift does not change with field.
            // Capped at the largest field a spin system may have; the deviation there is as close to the limit as it gets.
            var limitField = ratio is { } r ? Math.Min(largest * Math.Max(1, LimitRatio / r), Math.Max(largest, SpinSystemRules.MaxFieldMHz)) : largest;
            var limit = Deviation(limitField);
            if (limit > tolerance)
                return new(cluster, FirstOrderReach.NotAtAnyField, null, null, new FieldMHz(largest), Deviation(largest), limit);
            var (beyond, below) = Bisect(largest, limitField, Deviation, settings);
            return new(cluster, FirstOrderReach.AboveLargestField, new FieldMHz(beyond), Deviation(beyond), new FieldMHz(below), Deviation(below), limit);
        }

        var (high, low) = Bisect(listed[from - 1], listed[from], Deviation, settings);
        return new(cluster, FirstOrderReach.Bracketed, new FieldMHz(high), Deviation(high), new FieldMHz(low), Deviation(low), null);
    }

    /// <summary>Bisects in log field between a field outside tolerance and a higher one within it, down to the settings' precision.</summary>
    private static (double Within, double Outside) Bisect(double outside, double within, Func<double, double> deviation, FieldPlanSettings settings)
    {
        while (within / outside > 1 + settings.FieldPrecision)
        {
            var middle = Math.Sqrt(outside * within);
            if (deviation(middle) <= settings.Tolerance) within = middle;
            else outside = middle;
        }
        return (within, outside);
    }

    private static bool IsObserved(SpinSystem system, int entry) => system.Nuclei[entry].Isotope == system.Observed;

    private static void Validate(FieldPlanSettings settings)
    {
        ArgumentNullException.ThrowIfNull(settings);
        if (!(settings.DefaultWidth.Value > 0) || !double.IsFinite(settings.DefaultWidth.Value))
            throw new ArgumentException($"the linewidth must be finite and above 0 Hz, got {settings.DefaultWidth.Value}", nameof(settings));
        if (!(settings.Tolerance > 0) || !double.IsFinite(settings.Tolerance))
            throw new ArgumentException($"the tolerance must be finite and above 0, got {settings.Tolerance}", nameof(settings));
        if (!(settings.FieldPrecision > 0) || !double.IsFinite(settings.FieldPrecision))
            throw new ArgumentException($"the field precision must be finite and above 0, got {settings.FieldPrecision}", nameof(settings));
        ArgumentNullException.ThrowIfNull(settings.Shape);
    }
}
