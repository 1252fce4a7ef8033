using System.Globalization;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>One trace of a fit as set up: where it came from, its field, the regions used and how they were chosen.</summary>
/// <param name="Processing">Steps that turned the data into a spectrum (empty when the data were already one).</param>
public sealed record TraceSetupRecord(
    string Source,
    string Format,
    double FieldMHz,
    IReadOnlyList<PpmRange> Regions,
    bool RegionsAutomatic,
    IReadOnlyList<PpmRange> Exclude,
    IReadOnlyList<string> Processing)
{
    /// <summary>The pivot of the trace's first-order phase (the centre of its regions), in ppm; null when the fit has none.</summary>
    public double? PhasePivotPpm { get; init; }

    /// <summary>The plain-words statement of <see cref="PhasePivotPpm"/> for reports; null when the fit has no first-order phase.</summary>
    public string? PhaseSlopeNote => PhasePivotPpm is { } pivot
        ? string.Create(CultureInfo.InvariantCulture, $"phase_deg_per_ppm turns each line by that many degrees per ppm of its distance from {pivot:0.####} ppm (the centre of the fitted regions)")
        : null;
}

/// <summary>One parameter as set up: start, bounds (given or default), whether it varied, why it was held, its tie.</summary>
public sealed record ParameterSetupRecord(
    string Name,
    ParameterKind Kind,
    double Start,
    double Lower,
    double Upper,
    bool BoundsGiven,
    bool Varied,
    string? HeldBecause,
    string? TiedWith);

/// <summary>
/// Everything needed to run a fit again: the traces with their fields, regions (given or automatic), exclusions and
/// processing; every parameter's start, bounds, hold and tie; the starts and their seed; the lineshape; the default shift
/// window and the declared symmetries; and, filled in by the program, the exact command line and the full version. The
/// JSON and HTML reports are both written from this one record.
/// </summary>
public sealed record FitSetupRecord
{
    public required IReadOnlyList<TraceSetupRecord> Traces { get; init; }
    public required IReadOnlyList<ParameterSetupRecord> Parameters { get; init; }
    public required IReadOnlyList<IReadOnlyList<string>> Ties { get; init; }
    public required int Starts { get; init; }
    public required int Seed { get; init; }

    /// <summary>Most minimiser iterations per stage of each start (<c>max_iterations</c>).</summary>
    public int MaxIterations { get; init; }
    public required string Lineshape { get; init; }
    public required double ShiftWindowPpm { get; init; }
    public required IReadOnlyList<string> Symmetries { get; init; }
    public required bool SymmetriesTied { get; init; }
    public string? CommandLine { get; init; }
    public string? Version { get; init; }

    internal static FitSetupRecord From(SpectrumFitProblem problem, ParameterLayout layout, SpectrumFitOptions options) => new()
    {
        Traces = problem.Data.Select((d, i) => new TraceSetupRecord(d.Trace.Origin.Source, d.Trace.Origin.Format, d.ObserveMHz, d.Regions,
            d.RegionsAutomatic, d.Exclude, d.Trace.Origin.Processing?.Describe().ToArray() ?? d.Processing)
        {
            PhasePivotPpm = layout.Parameters.Any(p => p.Kind == ParameterKind.PhaseDegPerPpm && p.Dataset == i) ? d.CentrePpm : null,
        }).ToArray(),
        Parameters = layout.Parameters.Select((p, i) =>
        {
            var f = layout.FreeIndexOf(i);
            var tied = f >= 0 ? layout.MembersOf(f).Where(m => m != i).Select(m => layout.Parameters[m].Name).ToArray() : [];
            return new ParameterSetupRecord(p.Name, p.Kind, problem.Parameters[i].Start, p.Lower, p.Upper, p.BoundsGiven, p.Vary, p.HeldBecause,
                tied.Length > 0 ? string.Join(", ", tied) : null);
        }).ToArray(),
        Ties = problem.Ties,
        Starts = options.Starts,
        Seed = options.Seed,
        MaxIterations = options.MaxIterationsPerStage,
        Lineshape = problem.Shape.ToString(),
        ShiftWindowPpm = problem.ShiftWindowPpm,
        Symmetries = problem.Symmetries.Select(s => string.Join(", ", s.Pairs.Select(p => $"{p.A} <-> {p.B}"))).ToArray(),
        SymmetriesTied = problem.SymmetriesTied,
    };

    /// <summary>The record as labelled lines of text, in a fixed order, for a report that lists it generically.</summary>
    public IReadOnlyList<(string Label, string Value)> Rows()
    {
        var inv = CultureInfo.InvariantCulture;
        var rows = new List<(string, string)>();
        for (var d = 0; d < Traces.Count; d++)
        {
            var t = Traces[d];
            var at = Traces.Count > 1 ? $"trace {d + 1}: " : "";
            rows.Add(($"{at}data", $"{t.Source} ({t.Format})"));
            rows.Add(($"{at}field", string.Create(inv, $"{t.FieldMHz:0.######} MHz (from the data)")));
            rows.Add(($"{at}regions ({(t.RegionsAutomatic ? "automatic" : "given")})", string.Join("; ", t.Regions)));
            rows.Add(($"{at}excluded", t.Exclude.Count == 0 ? "none" : string.Join("; ", t.Exclude)));
            rows.Add(($"{at}processing", t.Processing.Count == 0 ? "none (the data were a spectrum)" : string.Join("; ", t.Processing)));
            if (t.PhaseSlopeNote is { } note) rows.Add(($"{at}first-order phase", note));
        }
        rows.Add(("lineshape", Lineshape));
        rows.Add(("starts", string.Create(inv, $"{Starts} (seed {Seed}); at most {MaxIterations} iterations per stage")));
        rows.Add(("shift window", string.Create(inv, $"start ± {ShiftWindowPpm:0.###} ppm unless bounded in [fit.bounds] (shift_window_ppm widens it)")));
        rows.Add(("ties", Ties.Count == 0 ? "none" : string.Join("; ", Ties.Select(t => string.Join(" = ", t)))));
        if (Symmetries.Count > 0)
            rows.Add(("declared symmetry", string.Join("; ", Symmetries) + (SymmetriesTied ? " (tied)" : " (not tied)")));
        foreach (var p in Parameters)
        {
            var state = p.Varied ? (p.TiedWith is null ? "varied" : $"varied, tied with {p.TiedWith}") : p.HeldBecause is null ? "held" : $"held: {p.HeldBecause}";
            var bounds = double.IsInfinity(p.Lower) && double.IsInfinity(p.Upper) ? "unbounded"
                : string.Create(inv, $"bounds [{p.Lower:G6}, {p.Upper:G6}]{(p.BoundsGiven ? " (given)" : " (default)")}");
            rows.Add(($"{p.Name}", string.Create(inv, $"start {p.Start:G8}; {bounds}; {state}")));
        }
        if (CommandLine is not null) rows.Add(("command line", CommandLine));
        if (Version is not null) rows.Add(("SpinSim version", Version));
        return rows;
    }
}
