using SpinSim.Core.Errors;
using SpinSim.Core.Model;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>What a fit parameter stands for. Units are in the names; everything else about a kind is in its <see cref="ParameterKindInfo"/>.</summary>
public enum ParameterKind { ShiftPpm, JHz, LinewidthHz, Scale, Baseline, OffsetHz, PhaseDeg, PhaseDegPerPpm }

/// <summary>How a reader groups fitted parameters: the chemistry first, then line widths, then the nuisance terms.</summary>
public enum ParameterGroup { Spin, Width, Nuisance }

/// <summary>
/// Everything the fitter, the model and the reports need to know about one kind of parameter, in one place: its name in
/// reports, unit, printed precision and label; whether it is a spin parameter (shift or coupling, moved by the random
/// starts and compared in Hz); its finite-difference step; how its value enters the model (the spin system, or the
/// state of one trace) and whether the model has an analytic Jacobian column for it; and, for the optional per-trace
/// terms, their default start and bounds. A new kind adds one entry to <see cref="All"/> plus its physics in
/// <see cref="SpectralModel"/> (what the trace state's new value does to a line, and that line's derivative).
/// </summary>
public sealed class ParameterKindInfo
{
    public required ParameterKind Kind { get; init; }

    /// <summary>The kind as the JSON report names it, e.g. <c>shift_ppm</c>; also the parameter's name for the per-trace terms.</summary>
    public required string Key { get; init; }

    public string Unit { get; init; } = "";

    /// <summary>.NET format of a value in the printed table.</summary>
    public required string ValueFormat { get; init; }

    /// <summary>Hz per unit of the value at a given observe frequency (MHz) for the spin kinds; null for the others.</summary>
    public Func<double, double>? HzPerUnit { get; init; }

    /// <summary>Absolute step for a central difference, from the value and the observe frequency (MHz).</summary>
    public required Func<double, double, double> DifferenceStep { get; init; }

    /// <summary>The label a reader sees, from the nuclei (primes typeset) and the name; null for the bare name.</summary>
    public required Func<IReadOnlyList<string>, string, string?> Label { get; init; }

    public ParameterGroup Group { get; init; } = ParameterGroup.Nuisance;

    /// <summary>Decimals of a value with no usable uncertainty (fixed, or undetermined by the data).</summary>
    public int FallbackDecimals { get; init; } = 4;

    /// <summary>
    /// For a per-trace term the setup switches on (offset, phases): its start and default bounds. Such a term varies
    /// whenever it is asked for, since asking for it is asking to fit it.
    /// </summary>
    public (double Start, double Lower, double Upper)? OptionalTraceTerm { get; init; }

    /// <summary>Shifts and couplings: what the spin Hamiltonian is made of.</summary>
    public bool IsSpin => HzPerUnit is not null;

    /// <summary>How a spin kind's value enters the system's entries and couplings (null for the other kinds).</summary>
    internal Action<Nucleus[], Coupling[], FitParameter, double>? EntersSystem { get; init; }

    /// <summary>How a spin kind is differentiated by the engine (null for the other kinds).</summary>
    internal Func<SpinSystem, FitParameter, Engine.SpinParameter>? EngineDerivative { get; init; }

    /// <summary>How a per-trace kind's value enters the state that draws one trace (null for the spin kinds).</summary>
    internal Action<TraceState, FitParameter, double>? EntersTrace { get; init; }

    /// <summary>
    /// True when the model has an exact column for this parameter whenever the engine gives line derivatives (scale and
    /// baseline have exact columns of their own; the others are central differences).
    /// </summary>
    internal Func<FitParameter, bool> AnalyticColumn { get; init; } = _ => false;

    private static readonly ParameterKindInfo[] All =
    [
        new()
        {
            Kind = ParameterKind.ShiftPpm, Key = "shift_ppm", Unit = "ppm", ValueFormat = "0.000000", HzPerUnit = mhz => mhz,
            DifferenceStep = (_, mhz) => 1e-4 / mhz, Group = ParameterGroup.Spin,
            Label = (n, _) => n.Count == 1 ? $"δ({n[0]})/ppm" : null,
            EntersSystem = (nuclei, _, p, v) => nuclei[p.Index] = nuclei[p.Index] with { Shift = new(v) },
            EngineDerivative = (_, p) => new(p.Index), AnalyticColumn = _ => true,
        },
        new()
        {
            Kind = ParameterKind.JHz, Key = "j_hz", Unit = "Hz", ValueFormat = "0.0000", HzPerUnit = _ => 1,
            DifferenceStep = (_, _) => 1e-4, Group = ParameterGroup.Spin, FallbackDecimals = 3,
            Label = (n, _) => n.Count == 2 ? $"J({n[0]},{n[1]})/Hz" : null,
            EntersSystem = (_, couplings, p, v) => couplings[p.Index] = couplings[p.Index] with { J = new(v) },
            EngineDerivative = (s, p) => new(s.IndexOf(s.Couplings[p.Index].A), s.IndexOf(s.Couplings[p.Index].B)), AnalyticColumn = _ => true,
        },
        new()
        {
            // One common width (Index -1, per trace or shared) or one per entry; only the common one has an analytic
            // column (per-entry widths follow the lines' origins, which the line derivatives do not carry).
            Kind = ParameterKind.LinewidthHz, Key = "linewidth_hz", Unit = "Hz", ValueFormat = "0.0000",
            DifferenceStep = (_, _) => 1e-4, Group = ParameterGroup.Width, FallbackDecimals = 3,
            Label = (n, _) => n.Count == 1 ? $"width({n[0]})/Hz" : "width/Hz",
            EntersTrace = (s, p, v) => { if (p.Index < 0) s.GlobalWidth = v; else s.PerEntryWidth[p.Index] = v; },
            AnalyticColumn = p => p.Index < 0,
        },
        new()
        {
            Kind = ParameterKind.Scale, Key = "scale", ValueFormat = "G5",
            DifferenceStep = (v, _) => 1e-6 * Math.Max(1, Math.Abs(v)), Label = (_, _) => "scale",
            EntersTrace = (s, _, v) => s.Scale = v,
        },
        new()
        {
            Kind = ParameterKind.Baseline, Key = "baseline", ValueFormat = "G5",
            DifferenceStep = (v, _) => 1e-6 * Math.Max(1, Math.Abs(v)), Label = (_, name) => $"baseline, {BaselineTerm(name)}",
            EntersTrace = (s, p, v) => s.Baseline.Add((p.Index, v)),
        },
        new()
        {
            Kind = ParameterKind.OffsetHz, Key = "offset_hz", Unit = "Hz", ValueFormat = "0.0000", DifferenceStep = (_, _) => 1e-4,
            FallbackDecimals = 3, Label = (_, _) => "offset/Hz", OptionalTraceTerm = (0, -10, 10),
            EntersTrace = (s, _, v) => s.OffsetHz = v, AnalyticColumn = _ => true,
        },
        new()
        {
            Kind = ParameterKind.PhaseDeg, Key = "phase_deg", Unit = "deg", ValueFormat = "0.0000", DifferenceStep = (_, _) => 1e-3,
            FallbackDecimals = 2, Label = (_, _) => "phase/°", OptionalTraceTerm = (0, -45, 45),
            EntersTrace = (s, _, v) => s.PhaseDeg = v, AnalyticColumn = _ => true,
        },
        new()
        {
            // First-order phase: the phase of a line grows by this many degrees per ppm of its distance from the pivot, the
            // centre of the trace's fitted regions (so that it barely correlates with the zero-order phase). Degrees per
            // ppm read the same at every field; ±30 °/ppm is 300 ° across a 10 ppm spectrum, far beyond a phasing error.
            Kind = ParameterKind.PhaseDegPerPpm, Key = "phase_deg_per_ppm", Unit = "deg/ppm", ValueFormat = "0.0000",
            DifferenceStep = (_, _) => 1e-3, FallbackDecimals = 2, Label = (_, _) => "phase slope/(°/ppm)",
            OptionalTraceTerm = (0, -30, 30),
            EntersTrace = (s, _, v) => s.PhaseDegPerPpm = v, AnalyticColumn = _ => true,
        },
    ];

    /// <summary>The description of <paramref name="kind"/>.</summary>
    public static ParameterKindInfo Of(ParameterKind kind) => All[(int)kind];

    /// <summary>"constant", "linear", ... for baseline0, baseline1, ... (with or without an @trace suffix).</summary>
    private static string BaselineTerm(string name)
    {
        var bare = name.Split('@')[0];
        return bare.Length > 0 && char.IsAsciiDigit(bare[^1])
            ? (bare[^1] - '0') switch { 0 => "constant", 1 => "linear", 2 => "quadratic", 3 => "cubic", var k => $"order {k}" }
            : bare;
    }
}

/// <summary>
/// One named parameter of a spectrum fit. Names: <c>shift:ID</c>, <c>j:A-B</c>, <c>linewidth</c> or
/// <c>linewidth:ID</c>, and per trace <c>scale</c>, <c>baseline0</c>.., <c>offset_hz</c>, <c>phase_deg</c>,
/// <c>phase_deg_per_ppm</c> (with
/// <c>@2</c>, <c>@3</c> appended for the second, third trace of a joint fit).
/// </summary>
/// <param name="Nuclei">Ids the parameter belongs to; empty for global ones.</param>
/// <param name="Dataset">Index of the trace a per-trace parameter belongs to, -1 for shared ones.</param>
/// <param name="Index">Entry index (shift, per-nucleus width), coupling index (J), or polynomial order (baseline).</param>
public sealed record FitParameter(
    string Name,
    ParameterKind Kind,
    IReadOnlyList<string> Nuclei,
    int Dataset,
    int Index,
    double Start,
    double Lower,
    double Upper,
    bool Vary)
{
    public string Unit => ParameterKindInfo.Of(Kind).Unit;

    /// <summary>True when the bounds come from the user's setup rather than the defaults.</summary>
    public bool BoundsGiven { get; init; }

    /// <summary>Why a parameter the setup would vary is held instead (null when it is not).</summary>
    public string? HeldBecause { get; init; }
}

/// <summary>
/// The full parameter list and how free values map onto it: parameters tied together share one free value;
/// fixed parameters keep their start value.
/// </summary>
public sealed class ParameterLayout
{
    private readonly int[] _freeOf; // parameter -> free index, -1 when fixed

    public ParameterLayout(IReadOnlyList<FitParameter> parameters, IReadOnlyList<IReadOnlyList<string>> ties)
    {
        Parameters = parameters;
        var byName = parameters.Select((p, i) => (p.Name, i)).ToDictionary(t => t.Name, t => t.i, StringComparer.Ordinal);
        var group = Enumerable.Range(0, parameters.Count).ToArray();
        foreach (var tie in ties)
        {
            var members = tie.Select(n => byName.TryGetValue(n, out var i) ? i
                : throw new InputException(null, null, $"tie names unknown parameter \"{n}\"", "Tie parameters of this system (shift:ID, j:A-B, linewidth)")).ToArray();
            var kinds = members.Select(m => parameters[m].Kind).Distinct().Count();
            if (kinds > 1) throw new InputException(null, null, $"tie [{string.Join(", ", tie)}] mixes parameters of different kinds", "Tie shifts with shifts and couplings with couplings");
            foreach (var m in members) Relabel(group, group[m], group[members[0]]);
        }
        _freeOf = Enumerable.Repeat(-1, parameters.Count).ToArray();
        var free = new List<int>();
        var representative = new Dictionary<int, int>();
        for (var i = 0; i < parameters.Count; i++)
        {
            if (!parameters[i].Vary) continue;
            if (!representative.TryGetValue(group[i], out var f))
            {
                f = free.Count;
                representative[group[i]] = f;
                free.Add(i);
            }
            _freeOf[i] = f;
        }
        FreeRepresentatives = free;
        Groups = group;
    }

    public IReadOnlyList<FitParameter> Parameters { get; }

    /// <summary>For each free value, the first parameter it stands for.</summary>
    public IReadOnlyList<int> FreeRepresentatives { get; }

    internal int[] Groups { get; }

    public int FreeCount => FreeRepresentatives.Count;

    public int FreeIndexOf(int parameter) => _freeOf[parameter];

    /// <summary>Parameters that share free value <paramref name="free"/>.</summary>
    public IEnumerable<int> MembersOf(int free) => Enumerable.Range(0, Parameters.Count).Where(i => _freeOf[i] == free);

    public double[] Expand(ReadOnlySpan<double> free)
    {
        var full = new double[Parameters.Count];
        for (var i = 0; i < full.Length; i++) full[i] = _freeOf[i] >= 0 ? free[_freeOf[i]] : Parameters[i].Start;
        return full;
    }

    public double[] FreeStart() => FreeRepresentatives.Select(i => Parameters[i].Start).ToArray();

    /// <summary>Bounds of each free value: the tightest of its members' bounds.</summary>
    public (double[] Lower, double[] Upper) FreeBounds()
    {
        var lower = new double[FreeCount];
        var upper = new double[FreeCount];
        for (var f = 0; f < FreeCount; f++)
        {
            lower[f] = MembersOf(f).Max(i => Parameters[i].Lower);
            upper[f] = MembersOf(f).Min(i => Parameters[i].Upper);
        }
        return (lower, upper);
    }

    private static void Relabel(int[] group, int from, int to)
    {
        if (from == to) return;
        for (var i = 0; i < group.Length; i++) if (group[i] == from) group[i] = to;
    }

    /// <summary>Applies the shift and coupling values of <paramref name="full"/> to <paramref name="system"/>.</summary>
    public SpinSystem ApplySpin(SpinSystem system, ReadOnlySpan<double> full)
    {
        var nuclei = system.Nuclei.ToArray();
        var couplings = system.Couplings.ToArray();
        for (var i = 0; i < Parameters.Count; i++)
            ParameterKindInfo.Of(Parameters[i].Kind).EntersSystem?.Invoke(nuclei, couplings, Parameters[i], full[i]);
        return SpinSystem.Create(system.Field, nuclei, couplings, system.Title, system.Observed);
    }
}
